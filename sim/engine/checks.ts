// Checks of a resolved scene as a whole before the engine runs it: warnings go to stderr and
// summary.json, errors stop the run with one line.

import type { Scene } from '../scene/types.js';
import { SceneError } from '../scene/schema.js';
import { stageAt } from './start.js';
import { hasRf } from '../stages/registry.js';

/** Checks that need the resolved scene as a whole; warnings go to stderr and summary.json. */
export function sceneWarnings(scene: Scene): string[] {
  const w: string[] = [];
  const withRf = scene.stages.some(hasRf);
  if (withRf && scene.run.integrator === 'rk4' && scene.run.stepsPerCycle < 20) {
    w.push(`run.steps_per_cycle = ${scene.run.stepsPerCycle} is below 20: RK4 phase error grows; results may be inaccurate`);
  }
  if (scene.spaceCharge && scene.run.recordEvery > 0) w.push('space_charge: trajectories are not recorded in coupled runs; summary.json carries the cloud figures');
  return w;
}

export function checkIntegrator(scene: Scene): void {
  if (scene.run.integrator === 'dopri5' && (scene.gas || scene.stages.some((s) => s.gas))) {
    throw new SceneError('run.integrator: dopri5 does not combine with buffer gas (collisions need the fixed step); use rk4');
  }
}

export function checkStartsInside(scene: Scene): void {
  scene.ions.forEach((p, i) => {
    if (stageAt(scene, p.position.z) < 0) {
      const end = scene.stages[scene.stages.length - 1].zEnd;
      throw new SceneError(`ions.${i}.position.z: ${p.position.z * 1e3} mm lies outside every stage (0 to ${(end * 1e3).toPrecision(6)} mm)`);
    }
  });
}
