// Mass-scan geometry of a solved trap (an axial or 3D electrodes stage whose RF ramps): the Mathieu
// a_z and q_z of the solved field at the trap centre, from the axial curvature of its potential.
// Near the centre z' = z − z_c on the axis, Φ ≈ Φ_c + ½ Φ_zz z'², so an ion obeys
//   z̈' = −(e/m)(Φ_zz^dc + V cos Ωt · Φ_zz^rf) z',
// which is Mathieu's equation d²z/dξ² + (a_z − 2q_z cos 2ξ) z = 0 with ξ = Ωt/2 for
//   a_z = 4e Φ_zz^dc / (m Ω²),   q_z = −2e V Φ_zz^rf / (m Ω²)
// (Φ_zz^rf per volt of the RF drive). For the ideal trap, Φ_rf = (r² − 2z²)/(r0² + 2z0²) + const
// gives q_z = 8eV/(m(r0² + 2z0²)Ω²), the trade's definition (March & Todd, Quadrupole Ion Trap Mass
// Spectrometry, 2nd ed., 2005, ch. 2). So a real trap's q_z is that of its own quadrupole term, and
// an ejection away from 0.908 is the work of the higher-order terms (holes, truncation, a cylinder
// for a ring), not of a nominal r0 and z0 that the field does not have.
//
// The centre is the point on the axis where the RF field E_z vanishes with the strongest
// focusing curvature (a mirror plane z gives it exactly); Φ_zz is the least-squares slope of
// ∂Φ/∂z over ±4 grid spacings about it (the interpolant's gradient is exact per cell; the z³ term
// of ∂Φ/∂z adds 4c₄⟨z'⁴⟩/⟨z'²⟩, under 1e-4 relative for the demo traps' octopole).

import type { MassScanGeometry } from '../kind.js';
import { ATOMIC_MASS_UNIT, ELEMENTARY_CHARGE } from '../../units/constants.js';
import type { ElectrodesStage } from './stage.js';
import { solvedFieldOf } from './solution.js';

export interface TrapCentre {
  /** Stage-local z of the centre, m. */
  z: number;
  /** ∂²Φ/∂z² at the centre: DC sum, V/m²; RF sum per volt of the drive, 1/m². */
  dcZz: number;
  rfZz: number;
}

const cache = new WeakMap<ElectrodesStage, TrapCentre | null>();

/** The trap centre of a solved axial or 3D stage with an RF sum, or null when its axis has no RF saddle. */
export function trapCentre(st: ElectrodesStage): TrapCentre | null {
  const known = cache.get(st);
  if (known !== undefined) return known;
  const F = solvedFieldOf(st);
  const out = new Float64Array(12);
  const o = F.oRf;
  let found: TrapCentre | null = null;
  if (o > 0 && !F.planar) {
    const h = F.grid.spacing, L = st.length;
    const gz = (z: number, k: number) => (F.evaluate(0, 0, z, out) ? out[k + 3] : NaN);
    // Zero crossings of ∂Φ_rf/∂z node by node, refined by bisection; the centre focuses the
    // ion for either sign of the drive, so the strongest |curvature| wins.
    let best = 0;
    const n = Math.floor(L / h);
    for (let i = 4; i < n - 4; i++) {
      let lo = i * h, hi = (i + 1) * h;
      const glo = gz(lo, o), ghi = gz(hi, o);
      if (!(glo * ghi <= 0) || glo === ghi) continue;
      for (let k = 0; k < 50; k++) { const mid = 0.5 * (lo + hi); if (gz(mid, o) * glo > 0) lo = mid; else hi = mid; }
      const z = 0.5 * (lo + hi);
      const rfZz = slope(gz, z, h, o), dcZz = slope(gz, z, h, 0);
      if (Number.isFinite(rfZz) && Math.abs(rfZz) > best) { best = Math.abs(rfZz); found = { z, dcZz, rfZz }; }
    }
  }
  cache.set(st, found);
  return found;
}

/** Least-squares slope of ∂Φ/∂z over 17 points in [z − 4h, z + 4h]. */
function slope(gz: (z: number, k: number) => number, z: number, h: number, k: number): number {
  let num = 0, den = 0;
  for (let j = -8; j <= 8; j++) { const d = 0.5 * j * h; num += d * gz(z + d, k); den += d * d; }
  return num / den;
}

/** The scan geometry when the stage's RF ramps and its grid has an axis (else undefined). */
export function electrodesScan(st: ElectrodesStage): MassScanGeometry | undefined {
  const rf = st.rf;
  if (rf?.ramp === undefined || st.problem.grid.symmetry === 'planar') return undefined;
  if (!st.problem.electrodes.some((e) => e.potential.rf !== 0)) return undefined;
  const omega2 = (2 * Math.PI * rf.frequency) ** 2;
  // Per unit m/z (charge 1): q_z = kq · V / (m/z), a_z = ka / (m/z). Asked lazily: the field is
  // solved by the run's preparation, after the scene is loaded.
  const k = () => {
    const c = trapCentre(st);
    return c === null ? { kq: NaN, ka: NaN } : { kq: (-2 * ELEMENTARY_CHARGE * c.rfZz) / (ATOMIC_MASS_UNIT * omega2), ka: (4 * ELEMENTARY_CHARGE * c.dcZz) / (ATOMIC_MASS_UNIT * omega2) };
  };
  const aux = st.aux !== undefined && st.problem.electrodes.some((e) => e.potential.aux !== 0) ? st.aux : undefined;
  return {
    qKey: 'qz', ejection: 'along z through the end-cap holes of the solved electrodes', rf, ...(aux ? { aux } : {}),
    a: (mz) => k().ka / mz,
    q: (amplitude, mz) => (k().kq * amplitude) / mz,
    mzPerVolt: (qEject) => k().kq / qEject,
  };
}
