// Engine speed on the reference scene of issue 3: ideal quadrupole, 20,000 ions of m/z 502 at a
// stable point, 5 eV, 150 mm, 40 steps per cycle, no recording. Ion-steps per second of
// `iontrail run` (1 and 2 workers) against a plain C RK4 kernel of the same physics
// (test/bench/c/quadrupole_rk4.c: the four stages per step, cc -O2, single thread), and against the
// same arithmetic as our kernel in C (quadrupole_rk4_matrix.c: each RK4 step as its amplification
// matrix), all in this one run; and ions per second against integrating each ion with odex 2.0.4.

import { odexIntegrate } from '../../sim/integrate/odex-reference.js';
import { ionMassKg, ELEMENTARY_CHARGE } from '../../sim/units/constants.js';
import { buildC, runC } from './cbuild.js';
import { engineRate } from './engine-rate.js';

const SCENE = `
name: bench quadrupole
seed: 7
stages:
  - type: quadrupole
    length: 150 mm
    r0: 4 mm
    rf: { amplitude: 600 V, frequency: 1.2 MHz }
    dc: 40 V
ions:
  - mz: 502
    count: 20000
    position: { spread: 0.1 mm }
    energy: 5 eV
    energy_spread: 0.2 eV
    angle_spread: 1 deg
run: { steps_per_cycle: 40, max_time: 300 us, record_every: 0 }
`;

function odexRate(nIons: number): number {
  const m = ionMassKg(502, 1), q = ELEMENTARY_CHARGE, r0 = 4e-3, U = 40, V = 600, omega = 2 * Math.PI * 1.2e6;
  const k = (2 * q) / (m * r0 * r0);
  const vz = Math.sqrt((2 * 5 * ELEMENTARY_CHARGE) / m);
  const tEnd = 0.15 / vz;
  const f = (t: number, y: Float64Array, d: Float64Array) => {
    const g = k * (U + V * Math.cos(omega * t));
    d[0] = y[2]; d[1] = y[3]; d[2] = -g * y[0]; d[3] = g * y[1];
  };
  const t0 = performance.now();
  for (let i = 0; i < nIons; i++) odexIntegrate(f, 0, [1e-4 * Math.cos(i), 1e-4 * Math.sin(i), 10, -10], tEnd, { rtol: 1e-8, atol: 1e-14 });
  return nIons / ((performance.now() - t0) / 1000);
}

export async function bench(): Promise<void> {
  const exe = buildC('quadrupole_rk4');
  const [cSteps, cSec] = runC(exe, ['20000']).split(' ').map(Number);
  const cRate = cSteps / cSec;
  const exeM = buildC('quadrupole_rk4_matrix');
  const [mSteps, mSec] = runC(exeM, ['20000']).split(' ').map(Number);
  const mRate = mSteps / mSec;
  const one = await engineRate(SCENE, 1);
  const two = await engineRate(SCENE, 2);
  const odexIons = odexRate(200);
  const ionsPerS1 = 20000 / one.wall;
  console.log(`C RK4 kernel (cc -O2, 1 thread): ${(cRate / 1e6).toFixed(2)} M ion-steps/s (${cSteps} steps in ${cSec.toFixed(3)} s)`);
  console.log(`C RK4, matrix form (cc -O2):     ${(mRate / 1e6).toFixed(2)} M ion-steps/s (${mSteps} steps in ${mSec.toFixed(3)} s)`);
  console.log(`iontrail run --workers 1:       ${(one.rate / 1e6).toFixed(2)} M ion-steps/s (${one.steps} steps, ${one.wall.toFixed(3)} s, ${one.detected} detected)`);
  console.log(`iontrail run --workers 2:       ${(two.rate / 1e6).toFixed(2)} M ion-steps/s (${two.wall.toFixed(3)} s)`);
  console.log(`odex 2.0.4 per ion (rtol 1e-8): ${odexIons.toFixed(1)} ions/s; iontrail 1 worker ${ionsPerS1.toFixed(0)} ions/s`);
  console.log(`ratio vs plain C RK4, 1 worker: ${(one.rate / cRate).toFixed(2)}  (goal >= 0.8)`);
  console.log(`ratio vs plain C RK4, 2 workers: ${(two.rate / cRate).toFixed(2)}  (goal >= 1.5)`);
  console.log(`ratio vs C matrix form (same arithmetic), 1 worker: ${(one.rate / mRate).toFixed(2)}, 2 workers: ${(two.rate / mRate).toFixed(2)}`);
  console.log(`ratio vs odex (ions/s), 1 worker: ${(ionsPerS1 / odexIons).toFixed(1)}`);
}
