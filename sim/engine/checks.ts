// Checks of a resolved scene as a whole before the engine runs it: warnings go to stderr and
// summary.json, errors stop the run with one line.

import type { Scene } from '../scene/types.js';
import { SceneError } from '../scene/schema.js';
import { stageAt } from './start.js';
import { solvedFieldWarnings } from './solved-fields.js';
import { hasRf, kindOf, rfOf } from '../stages/registry.js';
import { collisionFrequency } from '../gas/collision-rate.js';
import { ELEMENTARY_CHARGE, ionMassKg } from '../units/constants.js';
import { fastestSecular, HISTORY_STEPS_PER_SECULAR } from '../scene/secular.js';

/**
 * RF amplitudes (zero-to-peak) above this arc over in the vacuum gaps and feedthroughs of a real
 * filter or trap; supplies in use give a few kV (common practice, no source).
 */
export const MAX_RF_V = 20e3;

/** Checks that need the resolved scene as a whole; warnings go to stderr and summary.json. */
export function sceneWarnings(scene: Scene): string[] {
  const w: string[] = [];
  const withRf = scene.stages.some(hasRf);
  if (withRf && scene.run.integrator === 'rk4' && scene.run.stepsPerCycle < 20) {
    w.push(`run.steps_per_cycle = ${scene.run.stepsPerCycle} is below 20: RK4 phase error grows; results may be inaccurate`);
  }
  w.push(...plausibilityWarnings(scene));
  const alias = historyAliasWarning(scene);
  if (alias) w.push(alias);
  w.push(...solvedFieldWarnings(scene));
  return w;
}

/** A history grid coarser than a quarter of the fastest secular period aliases the cloud size. */
export function historyAliasWarning(scene: Scene): string | null {
  const sec = fastestSecular(scene.stages, scene.ions);
  if (sec === null) return null;
  const limit = 1 / (4 * sec.hz);
  if (!(scene.run.historyEvery > limit * (1 + 1e-9))) return null;
  const us = (t: number) => `${Number((t * 1e6).toPrecision(3))} µs`;
  return `run.history_every = ${us(scene.run.historyEvery)} aliases the cloud-size trace: the secular motion of m/z ${sec.mz} in stage ${sec.stage} runs at ${Number((sec.hz / 1e3).toPrecision(4))} kHz (period ${us(1 / sec.hz)}) and a cloud breathes at twice that; use at most ${us(limit)} (leave it out for ${HISTORY_STEPS_PER_SECULAR} samples per period)`;
}

export function checkIntegrator(scene: Scene): void {
  if (scene.run.integrator === 'dopri5' && (scene.gas || scene.stages.some((s) => s.gas))) {
    throw new SceneError('run.integrator: dopri5 does not combine with buffer gas (collisions need the fixed step); use rk4');
  }
  if (scene.run.integrator === 'dopri5') {
    scene.stages.forEach((s, i) => {
      const why = kindOf(s).adaptiveUnavailable;
      if (why !== undefined) throw new SceneError(`run.integrator: dopri5 cannot integrate stage ${s.sceneIndex ?? i} (${why}); use rk4`);
    });
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

/** Legal but implausible values: each stage kind's own, RF breakdown, collision-dominated RF motion. */
export function plausibilityWarnings(scene: Scene): string[] {
  const w: string[] = [];
  scene.stages.forEach((st, i) => {
    const at = `stages.${st.sceneIndex ?? i} (${st.type})`;
    for (const reason of kindOf(st).plausibility(st)) w.push(`${at}: ${reason}`);
    const rf = rfOf(st);
    if (rf === undefined) return;
    if (rf.amplitude > MAX_RF_V) {
      w.push(`${at}: RF amplitude ${Number((rf.amplitude / 1e3).toPrecision(4))} kV is above ${MAX_RF_V / 1e3} kV, where electrodes and feedthroughs break down (common practice, no source); check the unit`);
    }
    const gas = st.gas ?? scene.gas;
    if (gas === undefined) return;
    // Collisions more often than once per RF period: the ions drift in the gas instead of following
    // the RF, and the Mathieu stability of the vacuum no longer describes them.
    let worst = 0, worstMz = 0;
    for (const p of scene.ions) {
      const nu = collisionFrequency(gas, ionMassKg(p.mz, p.charge), Math.abs(p.charge) * ELEMENTARY_CHARGE);
      if (nu > worst) { worst = nu; worstMz = p.mz; }
    }
    if (worst > rf.frequency) {
      w.push(`${at}: at ${Number(gas.pressurePa.toPrecision(3))} Pa of ${gas.species} an ion of m/z ${worstMz} collides about ${Number(worst.toPrecision(2)).toExponential()} times per second, more often than the RF frequency ${Number(rf.frequency.toPrecision(4))} Hz: the motion is collision-dominated (mean free time shorter than one RF period)`);
    }
  });
  return w;
}
