// Multipole kernel speed: an octupole guide in vacuum (r0 3 mm, 2 MHz, 150 V, 200 mm), 5,000 ions of
// m/z 200 at 2 eV, 40 steps per cycle, no recording. Ion-steps per second of `iontrail run` with
// 1 worker against a plain C RK4 kernel of the same field (test/bench/c/multipole_rk4.c, cc -O2,
// single thread), both in this one run. Goal: ratio >= 0.8.

import { buildC, runC } from './cbuild.js';
import { engineRate } from './engine-rate.js';

const IONS = 5000;
const SCENE = `
name: bench octupole guide
seed: 7
stages:
  - { type: multipole, poles: 8, length: 200 mm, r0: 3 mm, rf: { amplitude: 150 V, frequency: 2 MHz } }
ions:
  - { mz: 200, count: ${IONS}, position: { spread: 0.3 mm }, energy: 2 eV, energy_spread: 0.2 eV, angle_spread: 2 deg }
run: { steps_per_cycle: 40, max_time: 1 ms, record_every: 0 }
`;

export async function bench(): Promise<void> {
  const exe = buildC('multipole_rk4');
  const [cSteps, cSec, cOut] = runC(exe, [String(IONS)]).split(' ').map(Number);
  const cRate = cSteps / cSec;
  const one = await engineRate(SCENE, 1);
  console.log(`C RK4 octupole kernel (cc -O2, 1 thread): ${(cRate / 1e6).toFixed(2)} M ion-steps/s (${cSteps} steps in ${cSec.toFixed(3)} s, ${cOut} through)`);
  console.log(`iontrail run --workers 1:                ${(one.rate / 1e6).toFixed(2)} M ion-steps/s (${one.steps} steps, ${one.wall.toFixed(3)} s, ${one.detected} detected)`);
  console.log(`ratio vs plain C RK4, 1 worker: ${(one.rate / cRate).toFixed(2)}  (goal >= 0.8)`);
}
