// Dehmelt pseudopotential well depth (H. G. Dehmelt, Adv. At. Mol. Phys. 3 (1967) 53; March & Todd,
// Quadrupole Ion Trap Mass Spectrometry, 2nd ed., 2005, §2.6).
// In the adiabatic limit the secular motion on axis u is harmonic with ω_u = β_u Ω/2 and
// β_u² ≈ a_u + q_u²/2, so the effective potential energy at the electrode distance u0 is
//   E_u = ½ m ω_u² u0² = m Ω² u0² (a_u + q_u²/2) / 8,
// and the depth per unit charge is D_u = E_u / (|z| e) volts. For pure RF this reduces to
//   trap, axial, r0² = 2 z0²:  D_z = q_z V / 8  (Dehmelt's result; March & Todd eq. 2.68),
//   trap, radial:              D_r = D_z / 2 for r0² = 2 z0²,
//   filter (rods ±V to ground, field amplitude 2Vx/r0²):  D_x = q V / 4  at x = r0.
// The DC term adds U (filter x), −U (filter y), −U·2z0²/d² (trap z) as the exact static part.
// The expansion behind β² ≈ a + q²/2 holds for |q| ≲ 0.4 (March & Todd §2.6); above that the
// figure is flagged as outside its range.

import { ELEMENTARY_CHARGE } from '../units/constants.js';

/** |q| below which the pseudopotential picture is taken as valid (March & Todd 2005, §2.6). */
export const PSEUDOPOTENTIAL_Q_LIMIT = 0.4;

export interface WellDepth {
  /** Depth per unit charge, V. */
  volts: number;
  /** Depth as an energy of the ion, eV (= |z| · volts). */
  electronVolts: number;
  /** |q| < 0.4. */
  valid: boolean;
}

/**
 * Pseudopotential depth on one axis. massKg: ion mass; charge: charge number; omega: angular RF
 * frequency Ω (rad/s); u0: distance from the centre to the electrode on that axis (m).
 */
export function wellDepth(a: number, q: number, massKg: number, charge: number, omega: number, u0: number): WellDepth {
  const energyJ = (massKg * omega * omega * u0 * u0 * (a + 0.5 * q * q)) / 8;
  const volts = energyJ / (Math.abs(charge) * ELEMENTARY_CHARGE);
  return { volts, electronVolts: volts * Math.abs(charge), valid: Math.abs(q) < PSEUDOPOTENTIAL_Q_LIMIT };
}
