// What every resolved stage has (SI), and the RF drive of the stages that carry one. Each kind's
// own fields are in its folder (sim/stages/<kind>/stage.ts).

import type { GasSettings } from '../gas/settings.js';

export interface RfDrive {
  /** Zero-to-peak amplitude, V, measured rod (or ring) to ground. */
  amplitude: number;
  /** Frequency, Hz. */
  frequency: number;
  /** Phase of the drive at t = 0, rad. */
  phase: number;
  /** Optional linear amplitude ramp: amplitude(t) = amplitude + rate·t until `to` is reached. */
  ramp?: { to: number; over: number };
}

export interface StageBase {
  /** Index of the scene-file entry this stage came from (a source gives two stages). */
  sceneIndex?: number;
  /** Position of the stage entrance and exit along z, m (filled in by the loader). */
  zStart: number;
  zEnd: number;
  length: number;
  /** Optional gas filling this stage only. */
  gas?: GasSettings;
}
