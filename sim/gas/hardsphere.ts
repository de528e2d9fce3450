// Hard-sphere buffer gas: Monte Carlo elastic collisions, isotropic in the centre-of-mass frame.
//
// Collision times: null-collision method (H. R. Skullerud, J. Phys. D 1, 1567 (1968)). Between
// collisions (and within the gas half of a split step) the ion's velocity v is constant, so the
// candidate process may use the speed-dependent majorant
//   ν*(v) = n σ (|v| + c̄),   c̄ = (8kT/(πM))^½ = mean gas speed,
// which bounds the true rate ν(v) = n σ ⟨|v − V|⟩ because |v − V| ≤ |v| + |V|. Each ion carries
// a remaining optical depth s ~ Exp(1); a step consumes ν*·dt of it, and a candidate occurs where it
// runs out. The depth carries over between steps, so collision times do not depend on the step.
//
// Partner velocity: a candidate picks V from the mixture
//   f̃(V) = f(V) (|v| + |V|)/(|v| + c̄)
// (f = Maxwell–Boltzmann at the gas temperature): with probability |v|/(|v|+c̄) V ~ f, else V from
// the speed-weighted Maxwellian (|V|²/a² ~ Gamma(2,1), a = (2kT/M)^½, isotropic direction). It is
// accepted as a real collision with probability g/(|v| + |V|) ≤ 1, g = |v − V|. The accepted rate
// density is then ν* f̃(V) g/(|v|+|V|) = n σ g f(V): exactly the hard-sphere collision kernel, with
// no bound on the gas speed needed.
//
// Scattering: elastic, g' = g·n̂ with n̂ uniform on the sphere; v' = v + M/(m+M) (g' − g).
// Random numbers: nine uniforms per candidate from the ion's counter-based gas stream, so an ion's
// collisions are the same however ions are batched or which worker runs them.
//
// Two ways to call it, with identical results: the plain GasStep (velocity through the batch
// arrays every step), or the kernel's pieces, which let a stepping loop keep the optical depth and
// the velocity in locals and touch memory only at a candidate — in JS the store/call/reload of the
// plain step costs more than the gas physics itself (see test/bench/gas.bench.ts):
//   let s = k.enter(b, i);                                   // once per ion per stage visit
//   per step: const d = s - (k.rateSlope * |v| + k.rateFloor) * h;
//             if (d > 0) s = d; else { store v; s = k.collide(b, i, h, s); reload v }
//   k.leave(b, i, s);                                        // before the ion leaves the kernel

import type { IonBatch } from '../engine/batch.js';
import { BOLTZMANN } from '../units/constants.js';
import { uniformAt } from '../random/counter.js';
import { checkGasSpec, GasSpecError, type GasSpec, type GasStep } from './model.js';
import { numberDensity } from './mobility.js';
import { GasScratchTable, type GasScratch } from './scratch.js';

/** Uniforms consumed per candidate collision (fixed, so counters stay easy to audit). */
export const DRAWS_PER_CANDIDATE = 9;

/** Hard-sphere gas pieces for a stepping loop; `step` is the same physics as a plain GasStep. */
export interface HardSphereKernel {
  /**
   * Majorant rate ν*(v) = rateSlope·|v| + rateFloor, 1/s (n σ and n σ c̄). Evaluate the step's
   * depth exactly as `s - (rateSlope * |v| + rateFloor) * dt` to match `step` bit for bit.
   */
  readonly rateSlope: number;
  readonly rateFloor: number;
  /** Remaining optical depth of ion i (drawn on first use of the slot). */
  enter(batch: IonBatch, i: number): number;
  /**
   * Candidates within a step of length dt that started with optical depth `depth` (≤ the step's
   * ν*·dt): updates batch.vx/vy/vz, gasCounter, collisions of ion i; returns the depth left.
   */
  collide(batch: IonBatch, i: number, dt: number, depth: number): number;
  /** Store the depth carried in a local back into the per-ion scratch. */
  leave(batch: IonBatch, i: number, depth: number): void;
  step: GasStep;
}

export function makeHardSphereStep(gas: GasSpec, seed: number): GasStep {
  return makeHardSphereKernel(gas, seed).step;
}

export function makeHardSphereKernel(gas: GasSpec, seed: number): HardSphereKernel {
  checkGasSpec(gas);
  if (gas.model !== 'hard-sphere') throw new GasSpecError('model', `expects hard-sphere here, got '${gas.model}'`);
  const gasMass = gas.massKg;
  const kT = BOLTZMANN * gas.temperatureK;
  const nSigma = numberDensity(gas.pressurePa, gas.temperatureK) * (gas.crossSectionM2 as number);
  const sigmaV = Math.sqrt(kT / gasMass); // per-component spread of the gas velocity
  const aGas = Math.SQRT2 * sigmaV; // most probable gas speed
  const meanGasSpeed = Math.sqrt((8 * kT) / (Math.PI * gasMass));
  const rateFloor = nSigma * meanGasSpeed;
  const TWO_PI = 2 * Math.PI;
  const scratch = new GasScratchTable(seed);
  let bound: IonBatch | null = null;
  let sc!: GasScratch;
  let depth: Float64Array = new Float64Array(0);
  let owner: Float64Array = new Float64Array(0);

  function bind(batch: IonBatch): void {
    sc = scratch.of(batch);
    depth = sc.state;
    owner = sc.owner;
    bound = batch;
  }

  function claim(batch: IonBatch, i: number): void {
    scratch.claim(sc, batch, i);
    const c = batch.gasCounter[i];
    depth[i] = -Math.log(uniformAt(sc.k0[i], sc.k1[i], c));
    batch.gasCounter[i] = c + 1;
  }

  function enter(batch: IonBatch, i: number): number {
    if (batch !== bound) bind(batch);
    if (owner[i] !== batch.index[i]) claim(batch, i);
    return depth[i];
  }

  function leave(batch: IonBatch, i: number, s: number): void {
    if (batch !== bound) bind(batch);
    depth[i] = s;
  }

  // Slow path: at least one candidate within this step.
  function collide(batch: IonBatch, i: number, dt: number, s: number): number {
    if (batch !== bound) bind(batch);
    const k0 = sc.k0[i];
    const k1 = sc.k1[i];
    const wGas = gasMass / (batch.mass[i] + gasMass);
    let c = batch.gasCounter[i];
    let vx = batch.vx[i];
    let vy = batch.vy[i];
    let vz = batch.vz[i];
    let speed = Math.sqrt(vx * vx + vy * vy + vz * vz);
    let rate = nSigma * speed + rateFloor;
    let left = dt;
    let hits = 0;
    // A non-finite speed (an ion already lost to a diverging field) gets no collisions rather than
    // an endless loop.
    while (s <= rate * left && rate < Infinity) {
      left -= s / rate;
      const u0 = uniformAt(k0, k1, c);
      const u1 = uniformAt(k0, k1, c + 1);
      const u2 = uniformAt(k0, k1, c + 2);
      const u3 = uniformAt(k0, k1, c + 3);
      const u4 = uniformAt(k0, k1, c + 4);
      const u5 = uniformAt(k0, k1, c + 5);
      c += DRAWS_PER_CANDIDATE;
      let gx: number, gy: number, gz: number, partnerSpeed: number;
      if (u0 * (speed + meanGasSpeed) < speed) {
        // V ~ Maxwell–Boltzmann: three normals by Box–Muller (Box & Muller 1958).
        const r1 = sigmaV * Math.sqrt(-2 * Math.log(u1));
        const r2 = sigmaV * Math.sqrt(-2 * Math.log(u3));
        const wx = r1 * Math.cos(TWO_PI * u2);
        const wy = r1 * Math.sin(TWO_PI * u2);
        const wz = r2 * Math.cos(TWO_PI * u4);
        partnerSpeed = Math.sqrt(wx * wx + wy * wy + wz * wz);
        gx = vx - wx; gy = vy - wy; gz = vz - wz;
      } else {
        // V from the speed-weighted Maxwellian: |V|²/a² = E1 + E2 (Gamma(2,1)), isotropic.
        partnerSpeed = aGas * Math.sqrt(-Math.log(u1) - Math.log(u2));
        const ct = 2 * u3 - 1;
        const st = Math.sqrt(Math.max(0, 1 - ct * ct));
        const ph = TWO_PI * u4;
        gx = vx - partnerSpeed * st * Math.cos(ph);
        gy = vy - partnerSpeed * st * Math.sin(ph);
        gz = vz - partnerSpeed * ct;
      }
      const g = Math.sqrt(gx * gx + gy * gy + gz * gz);
      if (u5 * (speed + partnerSpeed) < g) {
        const ct = 2 * uniformAt(k0, k1, c - 3) - 1;
        const st = Math.sqrt(Math.max(0, 1 - ct * ct));
        const ph = TWO_PI * uniformAt(k0, k1, c - 2);
        vx += wGas * (g * st * Math.cos(ph) - gx);
        vy += wGas * (g * st * Math.sin(ph) - gy);
        vz += wGas * (g * ct - gz);
        speed = Math.sqrt(vx * vx + vy * vy + vz * vz);
        rate = nSigma * speed + rateFloor;
        hits++;
      }
      s = -Math.log(uniformAt(k0, k1, c - 1));
    }
    batch.vx[i] = vx;
    batch.vy[i] = vy;
    batch.vz[i] = vz;
    batch.gasCounter[i] = c;
    batch.collisions[i] += hits;
    return s - rate * left;
  }

  // Plain GasStep: one speed and one multiply-add on the ion's optical depth per call.
  function hardSphereStep(batch: IonBatch, i: number, dt: number): void {
    if (batch !== bound) bind(batch);
    if (owner[i] !== batch.index[i]) claim(batch, i);
    const vx = batch.vx[i];
    const vy = batch.vy[i];
    const vz = batch.vz[i];
    const s = depth[i];
    const d = s - (nSigma * Math.sqrt(vx * vx + vy * vy + vz * vz) + rateFloor) * dt;
    depth[i] = d > 0 ? d : collide(batch, i, dt, s);
  }

  return { rateSlope: nSigma, rateFloor, enter, collide, leave, step: hardSphereStep };
}
