// Mathieu a and q of an operating point (DESIGN.md conventions, SI in, dimensionless out).
// With ξ = Ωt/2 the equations of motion become u'' + (a_u − 2 q_u cos 2ξ) u = 0
// (Dawson, Quadrupole Mass Spectrometry and its Applications, 1976, ch. 2; March & Todd,
// Quadrupole Ion Trap Mass Spectrometry, 2nd ed., 2005, ch. 2).
//
// Quadrupole filter, rods at ±(U + V cos Ωt) to ground, V zero-to-peak:
//   a_x = 8 z e U / (m r0² Ω²),  q_x = 4 z e V / (m r0² Ω²),  (a_y, q_y) = (−a_x, −q_x).
// RF trap, ring at U + V cos Ωt, end caps grounded, d² = r0² + 2 z0²:
//   a_z = −16 z e U / (m d² Ω²),  q_z = 8 z e V / (m d² Ω²),  (a_r, q_r) = (−a_z/2, −q_z/2).
// The sign of q only shifts the RF phase by half a period; it does not change stability or β.

import { ELEMENTARY_CHARGE, ATOMIC_MASS_UNIT } from '../units/constants.js';

export type Analyzer = 'quadrupole' | 'trap';

/** Operating point in SI: lengths m, frequency Hz (not angular), voltages V (V zero-to-peak). */
export interface OperatingPoint {
  analyzer: Analyzer;
  /** Field radius: rod inscribed radius (filter) or ring inner radius (trap), m. */
  r0: number;
  /** Trap only: centre to end cap, m. Default r0/√2. */
  z0?: number;
  /** RF frequency f = Ω/2π, Hz. */
  freq: number;
  /** RF amplitude V, zero-to-peak, V. */
  rf: number;
  /** DC U, V. */
  dc: number;
  /** m/z in u per elementary charge (Th). */
  mz: number;
  /** Charge number z (sign included); default 1. */
  charge?: number;
}

/** Per-axis pair; the filter uses x and y, the trap z and r. */
export type AxisName = 'x' | 'y' | 'z' | 'r';

export interface AxisQA {
  axis: AxisName;
  a: number;
  q: number;
}

/** Default end-cap distance of the trap: z0 = r0/√2 (r0² = 2 z0², the classic geometry). */
export function defaultZ0(r0: number): number {
  return r0 / Math.SQRT2;
}

/**
 * z e / m for an ion of the given m/z and charge number, C/kg. With m = (m/z)·|z|·u the charge
 * number cancels except for its sign (electron mass neglected, see ionMassKg).
 */
export function chargeToMass(mz: number, charge = 1): number {
  return Math.sign(charge) * ELEMENTARY_CHARGE / (mz * ATOMIC_MASS_UNIT);
}

/** Geometric factor G so that q = G·(ze/m)·V/Ω² and a = 2G·(ze/m)·U/Ω² for the reference axis (x or z). */
function axisFactor(p: Pick<OperatingPoint, 'analyzer' | 'r0' | 'z0'>): { g: number; aSign: number } {
  if (p.analyzer === 'quadrupole') return { g: 4 / (p.r0 * p.r0), aSign: 1 };
  const z0 = p.z0 ?? defaultZ0(p.r0);
  return { g: 8 / (p.r0 * p.r0 + 2 * z0 * z0), aSign: -1 };
}

/** a and q on each axis: [x, y] for the filter, [z, r] for the trap. */
export function mathieuParameters(p: OperatingPoint): [AxisQA, AxisQA] {
  const omega = 2 * Math.PI * p.freq;
  const k = chargeToMass(p.mz, p.charge ?? 1) / (omega * omega);
  const { g, aSign } = axisFactor(p);
  const q = g * k * p.rf;
  const a = aSign * 2 * g * k * p.dc;
  if (p.analyzer === 'quadrupole') return [{ axis: 'x', a, q }, { axis: 'y', a: -a, q: -q }];
  return [{ axis: 'z', a, q }, { axis: 'r', a: -a / 2, q: -q / 2 }];
}

/**
 * m/z (u per charge) at which the reference axis (x or z) has the given q for RF amplitude V:
 * inverts q = G e V / (m/z · u · Ω²). Independent of the charge number.
 */
export function mzAtQ(p: Pick<OperatingPoint, 'analyzer' | 'r0' | 'z0' | 'freq'>, rf: number, q: number): number {
  const omega = 2 * Math.PI * p.freq;
  const { g } = axisFactor(p);
  return (g * ELEMENTARY_CHARGE * Math.abs(rf)) / (ATOMIC_MASS_UNIT * omega * omega * Math.abs(q));
}

/**
 * a and q of the filter's x axis for an ion of charge q (C, signed) and mass m (kg):
 * a = 8qU/(m r0² Ω²), q = 4qV/(m r0² Ω²), the y axis (−a, −q). The per-population form of the
 * transfer-matrix path (sim/fastpath), which holds q and m rather than m/z.
 */
export function filterAxisQA(r0: number, freq: number, dc: number, rf: number, charge: number, mass: number): { a: number; q: number } {
  const omega = 2 * Math.PI * freq;
  const k = charge / (mass * r0 * r0 * omega * omega);
  return { a: 8 * k * dc, q: 4 * k * rf };
}

/** a_z of a trap for a singly charged ion of m/z: −16eU/((m/z) u (r0² + 2z0²) Ω²) (trap scans). */
export function trapAz(r0: number, z0: number, freq: number, dc: number, mz: number): number {
  const d2 = r0 * r0 + 2 * z0 * z0;
  const om = 2 * Math.PI * freq;
  return (-16 * ELEMENTARY_CHARGE * dc) / (mz * ATOMIC_MASS_UNIT * d2 * om * om);
}

/** q_z of a trap for a singly charged ion of m/z at RF amplitude V: 8eV/((m/z) u (r0² + 2z0²) Ω²). */
export function trapQz(r0: number, z0: number, freq: number, rf: number, mz: number): number {
  const d2 = r0 * r0 + 2 * z0 * z0;
  const om = 2 * Math.PI * freq;
  return (8 * ELEMENTARY_CHARGE * rf) / (mz * ATOMIC_MASS_UNIT * d2 * om * om);
}

/** m/z per volt of RF amplitude at which a trap's q_z equals qz: 8e/(q_z u (r0² + 2z0²) Ω²). */
export function trapMzPerVolt(r0: number, z0: number, freq: number, qz: number): number {
  const d2 = r0 * r0 + 2 * z0 * z0;
  const om = 2 * Math.PI * freq;
  return (8 * ELEMENTARY_CHARGE) / (qz * ATOMIC_MASS_UNIT * d2 * om * om);
}
