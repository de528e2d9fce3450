import type { RfDrive, StageBase } from '../base.js';

/**
 * Linear (2D) quadrupole ion trap: four rods of length 2·z0 at ±(dc + amplitude·cos(2π f t + phase))
 * (x rods +, y rods −, inscribed radius r0), closed along z by end electrodes at end_dc. The end
 * electrodes are modelled as the ideal harmonic well Φ = κ·U_end·(2z² − x² − y²)/(2 z0²) about the
 * stage centre, κ being the geometric factor of the end electrodes (field.ts).
 */
export interface LinearTrapStage extends StageBase {
  type: 'linear-trap';
  r0: number;
  /** Half the rod length, m: the end electrodes sit at z = ±z0 from the centre. */
  z0: number;
  rf: RfDrive;
  /** DC on the rods, V (x rods +, y rods −). */
  dc: number;
  /** DC on both end electrodes, V, relative to the rods' mean potential. */
  endDc: number;
  /** Geometric factor of the end electrodes: the share of end_dc that forms the quadratic well. */
  kappa: number;
  /** Supplementary dipolar AC across the x rod pair (zero-to-peak rod-to-rod voltage, Hz, rad). */
  aux?: { amplitude: number; frequency: number; phase: number };
}
