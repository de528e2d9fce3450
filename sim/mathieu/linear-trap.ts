// Mathieu parameters of the linear quadrupole trap (sim/stages/linear-trap): rods at
// ±(U + V cos Ωt) (DESIGN.md filter convention), end electrodes at U_end forming the ideal well
// κ U_end (2z² − x² − y²)/(2 z0²). Equations of motion (derived in sim/stages/linear-trap/kernel.ts):
//   ẍ = −(2e/(m r0²))(U + V cos Ωt) x + w x,  ÿ = +(2e/(m r0²))(U + V cos Ωt) y + w y,  z̈ = −2w z,
//   w = e κ U_end/(m z0²)   (e: the ion's charge)
// so with τ = Ωt/2 (March & Todd, Quadrupole Ion Trap Mass Spectrometry, 2005, ch. 2, for the
// Mathieu form; the well's shift worked out here):
//   a_x = 8eU/(m r0² Ω²) − 4eκU_end/(m z0² Ω²),  a_y = −8eU/(m r0² Ω²) − 4eκU_end/(m z0² Ω²),
//   q_x = −q_y = 4eV/(m r0² Ω²),  ω_z² = 2eκU_end/(m z0²).

import { ATOMIC_MASS_UNIT, ELEMENTARY_CHARGE } from '../units/constants.js';
import { floquet } from './floquet.js';

export interface LinearTrapInput {
  r0: number; z0: number; freq: number; rf: number; dc: number;
  endDc: number; kappa: number;
  mz: number; charge?: number;
}

/** The well's shift of both radial a: −4eκU_end/(m z0² Ω²). */
export function linearTrapAShift(p: Omit<LinearTrapInput, 'rf' | 'dc'>): number {
  const z = p.charge ?? 1, m = p.mz * Math.abs(z) * ATOMIC_MASS_UNIT, w = 2 * Math.PI * p.freq;
  return (-4 * z * ELEMENTARY_CHARGE * p.kappa * p.endDc) / (m * p.z0 * p.z0 * w * w);
}

/** a_x (the x rods' coordinate, the one the slot and the AC are on). */
export function linearTrapAx(p: Omit<LinearTrapInput, 'rf'>): number {
  const z = p.charge ?? 1, m = p.mz * Math.abs(z) * ATOMIC_MASS_UNIT, w = 2 * Math.PI * p.freq;
  return (8 * z * ELEMENTARY_CHARGE * p.dc) / (m * p.r0 * p.r0 * w * w) + linearTrapAShift(p);
}

/** q_x = 4eV/(m r0² Ω²). */
export function linearTrapQx(r0: number, freq: number, rf: number, mz: number, charge = 1): number {
  const w = 2 * Math.PI * freq;
  return (4 * charge * ELEMENTARY_CHARGE * rf) / (mz * Math.abs(charge) * ATOMIC_MASS_UNIT * r0 * r0 * w * w);
}

/** m/z per volt of RF amplitude for ions ejected at q_x = qEject (charge 1). */
export function linearTrapMzPerVolt(r0: number, freq: number, qEject: number): number {
  const w = 2 * Math.PI * freq;
  return (4 * ELEMENTARY_CHARGE) / (qEject * ATOMIC_MASS_UNIT * r0 * r0 * w * w);
}

/** Axial secular angular frequency √(2eκU_end/(m z0²)), rad/s, or null when the well does not hold. */
export function linearTrapAxialOmega(p: Pick<LinearTrapInput, 'z0' | 'endDc' | 'kappa' | 'mz' | 'charge'>): number | null {
  const z = p.charge ?? 1, m = p.mz * Math.abs(z) * ATOMIC_MASS_UNIT;
  const w2 = (2 * z * ELEMENTARY_CHARGE * p.kappa * p.endDc) / (m * p.z0 * p.z0);
  return w2 > 0 ? Math.sqrt(w2) : null;
}

export interface LinearTrapReport {
  a_x: number; q_x: number; beta_x: number | null; stable_x: boolean;
  a_y: number; q_y: number; beta_y: number | null; stable_y: boolean;
  a_shift: number;
  /** Radial secular frequencies β Ω/(4π), Hz (null when unstable). */
  radial_secular_x_hz: number | null; radial_secular_y_hz: number | null;
  axial_secular_hz: number | null;
  /** Axial well depth at the end electrodes, κ·U_end, V. */
  axial_well_depth_v: number;
}

export function linearTrapFigures(p: LinearTrapInput): LinearTrapReport {
  const shift = linearTrapAShift(p);
  const ax = linearTrapAx(p), ay = ax - 2 * (ax - shift);
  const qx = linearTrapQx(p.r0, p.freq, p.rf, p.mz, p.charge ?? 1);
  const fx = floquet(ax, qx), fy = floquet(ay, -qx);
  const wz = linearTrapAxialOmega(p);
  const sec = (b: number | null) => (b === null ? null : (b * p.freq) / 2);
  return {
    a_x: ax, q_x: qx, beta_x: fx.beta, stable_x: fx.stable,
    a_y: ay, q_y: -qx, beta_y: fy.beta, stable_y: fy.stable,
    a_shift: shift,
    radial_secular_x_hz: sec(fx.beta), radial_secular_y_hz: sec(fy.beta),
    axial_secular_hz: wz === null ? null : wz / (2 * Math.PI),
    axial_well_depth_v: p.kappa * p.endDc,
  };
}
