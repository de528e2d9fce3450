// RF multipoles of 2n rods (n = 2 quadrupole, 3 hexapole, 4 octupole, ...): the effective
// (pseudo)potential and the adiabaticity parameter of D. Gerlich, "Inhomogeneous RF fields: a
// versatile tool for the study of processes with slow ions", Adv. Chem. Phys. 82, 1 (1992):
//   Φ = V cos(Ωt) (r/r0)^n cos(nθ)           (rods at ±V, zero-to-peak, rod to ground)
//   V*(r) = n² q² V² / (4 m Ω² r0²) · (r/r0)^(2n−2)     (energy, J)
//   η(r)  = 2n(n−1) q V / (m Ω² r0²) · (r/r0)^(n−2)
// The effective potential holds where η is small; Gerlich gives η < 0.3 as the working limit, so
// the radius where η reaches 0.3 bounds the usable part of the field (n > 2; for the quadrupole η
// is the same everywhere and equals the Mathieu q = 4qV/(mΩ²r0²), since 2n(n−1) = 4).

import { ATOMIC_MASS_UNIT, ELEMENTARY_CHARGE } from '../units/constants.js';

export interface MultipoleInput {
  /** Rods: 2n. */
  poles: number;
  /** Inscribed radius, m; RF frequency, Hz; RF amplitude zero-to-peak, V. */
  r0: number; freq: number; rf: number;
  mz: number; charge?: number;
  /** Radius at which the effective potential is given, m (default r0). */
  radius?: number;
}

export interface MultipoleReport {
  poles: number; n: number;
  /** Effective potential at `radius`, in eV and as volts per unit charge. */
  radius_m: number;
  effective_potential_ev: number;
  effective_potential_v: number;
  /** Depth at the rods' inscribed radius r0 (the well's rim), eV. */
  depth_at_r0_ev: number;
  eta_at_radius: number;
  eta_at_r0: number;
  /** Radius where η reaches 0.3, m: null when η stays below 0.3 inside r0, or (quadrupole) is uniform. */
  eta_limit_radius_m: number | null;
  eta_limit: number;
}

export const ETA_LIMIT = 0.3;

/** V*(r) = n² q² V² / (4 m Ω² r0²) · (r/r0)^(2n−2), J (Gerlich 1992), as a function of r. */
export function multipoleEffectivePotential(poles: number, r0: number, freq: number, rf: number, mz: number, charge = 1): (r: number) => number {
  const n = poles / 2, z = Math.abs(charge);
  const q = z * ELEMENTARY_CHARGE, m = mz * z * ATOMIC_MASS_UNIT, w = 2 * Math.PI * freq;
  const k = (n * n * q * q * rf * rf) / (4 * m * w * w * r0 * r0);
  return (r) => k * (r / r0) ** (2 * n - 2);
}

export function multipoleFigures(p: MultipoleInput): MultipoleReport {
  if (!Number.isInteger(p.poles) || p.poles < 4 || p.poles % 2 !== 0) throw new RangeError(`poles must be an even whole number ≥ 4, got ${p.poles}`);
  const n = p.poles / 2;
  const z = Math.abs(p.charge ?? 1);
  const q = z * ELEMENTARY_CHARGE, m = p.mz * z * ATOMIC_MASS_UNIT;
  const w = 2 * Math.PI * p.freq;
  const r = p.radius ?? p.r0;
  const vStar = (x: number) => ((n * n * q * q * p.rf * p.rf) / (4 * m * w * w * p.r0 * p.r0)) * (x / p.r0) ** (2 * n - 2);
  const eta = (x: number) => ((2 * n * (n - 1) * q * p.rf) / (m * w * w * p.r0 * p.r0)) * (x / p.r0) ** (n - 2);
  const e0 = eta(p.r0);
  const limit = n > 2 && e0 > ETA_LIMIT ? p.r0 * (ETA_LIMIT / e0) ** (1 / (n - 2)) : null;
  return {
    poles: p.poles, n, radius_m: r,
    effective_potential_ev: vStar(r) / ELEMENTARY_CHARGE,
    effective_potential_v: vStar(r) / q,
    depth_at_r0_ev: vStar(p.r0) / ELEMENTARY_CHARGE,
    eta_at_radius: eta(r), eta_at_r0: e0,
    eta_limit_radius_m: limit, eta_limit: ETA_LIMIT,
  };
}
