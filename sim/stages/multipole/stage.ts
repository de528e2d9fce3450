import type { RfDrive, StageBase } from '../base.js';

/**
 * Ideal RF multipole of 2n rods (an ion guide, or a collision cell with gas): rods alternately at
 * ±(dc + amplitude·cos(2π f t + phase)), inscribed radius r0, potential
 * Φ = (U + V cos Ωt)(r/r0)^n cos(nθ).
 */
export interface MultipoleStage extends StageBase {
  type: 'multipole';
  /** Number of rods, 2n (4 quadrupole, 6 hexapole, 8 octupole, ...). */
  poles: number;
  r0: number;
  rf: RfDrive;
  dc: number;
}
