// The detector: a disc in the exit plane of the last stage, centred on the axis. An ion leaving
// the last stage forward is detected when it crosses that plane inside the disc and missed when
// outside (x² + y² ≥ R², the rule of every hole in the tool). Its radius comes from the scene's
// `detector: { radius }`, else the exit aperture of the last stage, else the r0 of the last RF
// stage (a field-free drift after a filter: the detector is as wide as the rods' opening), else
// it is unbounded (every ion reaching the plane is detected).

import type { Scene } from './types.js';
import { kindOf } from '../stages/registry.js';

export interface DetectorChoice {
  /** Radius, m (Infinity: unbounded). */
  radius: number;
  /** Where the radius came from, for summary.json: "scene", "aperture of stage 1", "r0 of stage 0", "none". */
  source: string;
}

/** The scene-file index of resolved stage i (a source entry makes two stages). */
const entryIndex = (scene: Pick<Scene, 'stages'>, i: number): number => scene.stages[i].sceneIndex ?? i;

export function detectorOf(scene: Pick<Scene, 'stages' | 'detector'>): DetectorChoice {
  if (scene.detector !== undefined) return { radius: scene.detector.radius, source: 'scene' };
  const last = scene.stages.length - 1;
  const ap = kindOf(scene.stages[last]).exitAperture(scene.stages[last]);
  if (ap !== undefined && Number.isFinite(ap)) return { radius: ap, source: `aperture of stage ${entryIndex(scene, last)}` };
  for (let i = last; i >= 0; i--) {
    const op = kindOf(scene.stages[i]).operatingPoint?.(scene.stages[i]);
    if (op !== undefined) return { radius: op.r0, source: `r0 of stage ${entryIndex(scene, i)}` };
  }
  return { radius: Infinity, source: 'none' };
}

/** Whether an ion at (x, y) in the detector plane misses a detector of radius R. */
export const missesDetector = (x: number, y: number, R: number): boolean => x * x + y * y >= R * R;
