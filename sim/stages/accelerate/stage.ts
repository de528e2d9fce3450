import type { StageBase } from '../base.js';

/** Uniform axial field: the potential falls by `voltage` (V) from entrance to exit. */
export interface AccelerateStage extends StageBase {
  type: 'accelerate';
  voltage: number;
  aperture: number;
  /** A closed far end (reflectron back plate): an ion reaching it is lost. */
  closed?: boolean;
  /** What the scene called it: a plain gap, a reflectron, or a region of a two-field source. */
  role?: 'gap' | 'reflectron' | 'source-extraction' | 'source-acceleration';
}
