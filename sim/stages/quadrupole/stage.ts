import type { RfDrive, StageBase } from '../base.js';

/** Ideal hyperbolic quadrupole; rods at ±(dc + amplitude·cos(2π f t + phase)). */
export interface QuadrupoleStage extends StageBase {
  type: 'quadrupole';
  r0: number;
  rf: RfDrive;
  dc: number;
  /** Hole radius of the entrance and exit plates, m; undefined: r0 (see apertures.ts). */
  entranceAperture?: number;
  exitAperture?: number;
}
