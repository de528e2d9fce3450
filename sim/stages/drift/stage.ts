import type { StageBase } from '../base.js';

/** Field-free region; `aperture` (m) is the tube radius, Infinity when not given. */
export interface DriftStage extends StageBase {
  type: 'drift';
  aperture: number;
  /** Reflectron instruments: an ion leaving back through this stage's entrance hits the detector. */
  detectReturning?: boolean;
}
