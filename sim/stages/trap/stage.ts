import type { RfDrive, StageBase } from '../base.js';

/** Ideal 3D RF trap: ring at dc + amplitude·cos(...), end caps grounded; centred in the stage. */
export interface TrapStage extends StageBase {
  type: 'trap';
  r0: number;
  z0: number;
  rf: RfDrive;
  dc: number;
  /** Radius of the holes in the end caps, m: an ion crossing an end cap within it leaves the trap. */
  aperture: number;
  /** Supplementary dipolar AC between the end caps (zero-to-peak cap-to-cap voltage, Hz, rad). */
  aux?: { amplitude: number; frequency: number; phase: number };
}
