// Shared pieces of the solved-field checks: a scene's solved stages made ready in this thread
// (field cache in a temporary folder, so no test writes to the user's cache), and one ion
// through a stage's kernel, called directly (no run folder).

import { allocateBatch } from '../../sim/core/batch.js';
import type { IonCursor, StepContext } from '../../sim/core/cursor.js';
import { parseScene } from '../../sim/scene/load.js';
import type { Scene } from '../../sim/scene/types.js';
import { prepareSolvedFields } from '../../sim/engine/solved-fields.js';
import { kindOf } from '../../sim/stages/registry.js';
import type { Stage } from '../../sim/stages/types.js';
import { tempDir } from '../helpers/temp.js';

/** Point the field cache at a fresh temporary folder (removed after the test file). */
export function privateFieldCache(): string {
  const d = tempDir('iontrail-fieldcache-');
  process.env.XDG_CACHE_HOME = d;
  return d;
}

export async function solvedScene(yaml: string, file = 'check.yaml'): Promise<Scene> {
  const scene = parseScene(yaml, file);
  await prepareSolvedFields(scene, file, { workers: 1 });
  return scene;
}

export function cursor(m: number, q: number, x: number, y: number, z: number, vx: number, vy: number, vz: number, tau = 0): IonCursor {
  return { ion: 0, slot: 0, m, q, tau, t: 0, x, y, z, vx, vy, vz, steps: 0, sinceRecord: 0, nextHist: 0 };
}

export function context(maxTime: number): StepContext {
  return { batch: allocateBatch(1), maxTime, recordEvery: 0, rec: null, hist: null, gas: null, gasField: null, hardSphere: null };
}

/** One ion through a stage's own kernel with fixed RK4 steps. */
export function fly(st: Stage, c: IonCursor, ctx: StepContext, stepsPerCycle: number, stepNoRf: number): number {
  return kindOf(st).track(st, c, ctx, { integrator: 'rk4', stepsPerCycle, tolerance: 1e-10, stepNoRf });
}
