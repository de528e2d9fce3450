// Stand-alone driver: N ions released in a gas, in field-free space or a uniform field, stepped
// with a gas kernel for a given time. Used by the checks in test/gas so they do not depend on the
// engine. Field and gas alternate by Strang splitting (half field, gas, half field); the field
// half-steps are the exact ballistic update of a uniform field. The drag model in a field uses its
// exact OU-with-force step instead.

import { allocateBatch, type IonBatch } from '../core/batch.js';
import { RandomStream, Purpose } from '../random/counter.js';
import { BOLTZMANN } from '../units/constants.js';
import { makeDragFieldStep } from './drag.js';
import type { GasSpec } from './model.js';
import { makeGasStep } from './step.js';

export interface RelaxOptions {
  gas: GasSpec;
  seed: number;
  ions: number;
  ionMassKg: number;
  chargeC: number;
  durationS: number;
  stepS: number;
  /** Uniform field, V/m; default none. */
  fieldVPerM?: readonly [number, number, number];
  /** Start velocities: Maxwellian at this temperature (K), else all at rest or `startSpeedMS`. */
  startTemperatureK?: number;
  /** Start speed, m/s, in a random direction (ignored when startTemperatureK is set). */
  startSpeedMS?: number;
  /** Start velocity, m/s, the same for every ion (used when neither of the above is set). */
  startVelocityMS?: readonly [number, number, number];
  /** Record the ensemble mean kinetic energy every this many steps (default: only at the end). */
  sampleEvery?: number;
}

export interface RelaxResult {
  batch: IonBatch;
  /** Sample times, s, and ensemble mean kinetic energy there, J. */
  times: number[];
  meanKeJ: number[];
}

export function startBatch(o: RelaxOptions): IonBatch {
  const b = allocateBatch(o.ions);
  for (let i = 0; i < o.ions; i++) {
    b.index[i] = i;
    b.mass[i] = o.ionMassKg;
    b.charge[i] = o.chargeC;
    const r = new RandomStream(o.seed, i, Purpose.start);
    if (o.startTemperatureK !== undefined) {
      const s = Math.sqrt((BOLTZMANN * o.startTemperatureK) / o.ionMassKg);
      b.vx[i] = s * r.normal(); b.vy[i] = s * r.normal(); b.vz[i] = s * r.normal();
    } else if (o.startSpeedMS !== undefined) {
      const ct = 2 * r.uniform() - 1, st = Math.sqrt(1 - ct * ct), ph = 2 * Math.PI * r.uniform();
      b.vx[i] = o.startSpeedMS * st * Math.cos(ph);
      b.vy[i] = o.startSpeedMS * st * Math.sin(ph);
      b.vz[i] = o.startSpeedMS * ct;
    } else if (o.startVelocityMS !== undefined) {
      [b.vx[i], b.vy[i], b.vz[i]] = o.startVelocityMS;
    }
  }
  return b;
}

export function meanKineticEnergy(b: IonBatch): number {
  let sum = 0;
  for (let i = 0; i < b.n; i++) sum += 0.5 * b.mass[i] * (b.vx[i] ** 2 + b.vy[i] ** 2 + b.vz[i] ** 2);
  return sum / b.n;
}

export function relax(o: RelaxOptions): RelaxResult {
  const b = startBatch(o);
  const steps = Math.round(o.durationS / o.stepS);
  const dt = o.durationS / steps;
  const [ex, ey, ez] = o.fieldVPerM ?? [0, 0, 0];
  const hasField = ex !== 0 || ey !== 0 || ez !== 0;
  const every = o.sampleEvery ?? steps;
  const times: number[] = [0];
  const meanKeJ: number[] = [meanKineticEnergy(b)];
  const gasStep = makeGasStep(o.gas, o.seed);
  const fieldStep = hasField && o.gas.model === 'drag' ? makeDragFieldStep(o.gas, o.seed) : null;
  const half = dt / 2;
  for (let k = 1; k <= steps; k++) {
    for (let i = 0; i < b.n; i++) {
      if (fieldStep) { fieldStep(b, i, dt, ex, ey, ez); continue; }
      if (hasField) kick(b, i, half, ex, ey, ez);
      else drift(b, i, half);
      gasStep(b, i, dt);
      if (hasField) kick(b, i, half, ex, ey, ez);
      else drift(b, i, half);
    }
    if (k % every === 0 || k === steps) {
      if (times[times.length - 1] !== k * dt) { times.push(k * dt); meanKeJ.push(meanKineticEnergy(b)); }
    }
  }
  for (let i = 0; i < b.n; i++) b.t[i] = steps * dt;
  return { batch: b, times, meanKeJ };
}

function drift(b: IonBatch, i: number, h: number): void {
  b.x[i] += b.vx[i] * h; b.y[i] += b.vy[i] * h; b.z[i] += b.vz[i] * h;
}

/** Exact motion over h in a uniform field: x += v h + a h²/2, v += a h. */
function kick(b: IonBatch, i: number, h: number, ex: number, ey: number, ez: number): void {
  const qm = b.charge[i] / b.mass[i];
  const ax = qm * ex, ay = qm * ey, az = qm * ez;
  b.x[i] += (b.vx[i] + 0.5 * ax * h) * h; b.vx[i] += ax * h;
  b.y[i] += (b.vy[i] + 0.5 * ay * h) * h; b.vy[i] += ay * h;
  b.z[i] += (b.vz[i] + 0.5 * az * h) * h; b.vz[i] += az * h;
}
