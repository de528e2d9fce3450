// Hard-sphere buffer gas: Monte Carlo elastic collisions, isotropic in the centre-of-mass frame.
//
// Collision times: null-collision method (H. R. Skullerud, J. Phys. D 1, 1567 (1968)). Between
// collisions (and within the gas half of a split step) the ion's velocity v is constant. The true
// rate is ν(v) = n σ ⟨|v − V|⟩ ≤ n σ (|v| + c̄), c̄ = (8kT/(πM))^½ the mean gas speed, because
// |v − V| ≤ |v| + |V|. Candidates come at the majorant rate
//   ν̂ = n σ (V̂ + c̄),   V̂ ≥ |v| a speed bound kept per ion,
// checked every step as v² ≤ V̂² (no square root in the common case), raised to 1.25 |v| when the
// field has pushed the ion past it, and reset after each real collision to max(1.25 |v'|, c̄/4).
// Each ion carries a remaining optical depth s ~ Exp(1); a step consumes ν̂·dt of it and a candidate
// occurs where it runs out. The depth carries over between steps, so collision times do not
// depend on the step.
//
// Candidate → partner: one uniform u0 splits ν̂ into three parts: u0 (V̂ + c̄) < |v|: V ~ f
// (Maxwell–Boltzmann at the gas temperature); < |v| + c̄: V from the speed-weighted Maxwellian
// f(V)|V|/c̄ (|V|²/a² ~ Gamma(2,1), a = (2kT/M)^½, isotropic); otherwise a null event. The partner
// is accepted as a real collision with probability g/(|v| + |V|) ≤ 1, g = |v − V|. The accepted
// rate density is ν̂ [ |v| f + c̄ f |V|/c̄ ]/(V̂ + c̄) · g/(|v| + |V|) = n σ g f(V): exactly the
// hard-sphere collision kernel, with no bound on the gas speed needed.
//
// Scattering: elastic, g' = g·n̂ with n̂ uniform on the sphere; v' = v + M/(m+M) (g' − g).
// Random numbers: nine uniforms per candidate from the ion's counter-based gas stream, so an ion's
// collisions are the same however ions are batched or which worker runs them.
//
// Two ways to call it, with identical results: the plain GasStep (velocity through the batch
// arrays every step), or the kernel's pieces, which let a stepping loop keep the optical depth,
// the bound and the velocity in locals and touch memory only at a candidate or a raise — in JS
// the store/call/reload of the plain step costs more than the gas physics (test/bench/gas.bench.ts):
//   k.enter(b, i); let s = k.depth, lim = k.limit2, rate = k.rate;     // once per stage visit
//   per step: const v2 = vx*vx + vy*vy + vz*vz, d = s - rate * h;
//             if (v2 <= lim && d > 0) s = d;
//             else { store v; k.collide(b, i, h, s); s = k.depth; lim = k.limit2; rate = k.rate; reload v }
//   k.leave(b, i, s);                                                  // before the ion leaves

import type { IonBatch } from '../core/batch.js';
import { BOLTZMANN } from '../units/constants.js';
import { uniformAt } from '../random/counter.js';
import { checkGasSpec, GasSpecError, type GasSpec, type GasStep } from './model.js';
import { numberDensity } from './mobility.js';
import { GasScratchTable, type GasScratch } from './scratch.js';
import type { HardSphereKernel } from '../core/cursor.js';

/** Uniforms consumed per candidate collision (fixed, so counters stay easy to audit). */
export const DRAWS_PER_CANDIDATE = 9;
/** Headroom of the speed bound over the speed that set it. */
const RAISE = 1.25;
/** Per-ion state: optical depth, V̂², majorant rate ν̂, V̂. */
const STRIDE = 4;

/** The kernel pieces' contract lives with the other stepping types (sim/core/cursor.ts). */
export type { HardSphereKernel } from '../core/cursor.js';

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
  const floorSpeed = 0.25 * meanGasSpeed; // the bound never drops below: few raises for slow ions
  const TWO_PI = 2 * Math.PI;
  const scratch = new GasScratchTable(seed, STRIDE);
  let bound: IonBatch | null = null;
  let sc!: GasScratch;
  let st: Float64Array = new Float64Array(0);
  let owner: Float64Array = new Float64Array(0);

  function bind(batch: IonBatch): void {
    sc = scratch.of(batch);
    st = sc.state;
    owner = sc.owner;
    bound = batch;
  }

  // New ion in slot i: its key, a first Exp(1) depth, and a bound that the first step raises.
  function claim(batch: IonBatch, i: number): void {
    scratch.claim(sc, batch, i);
    const c = batch.gasCounter[i];
    const o = STRIDE * i;
    st[o] = -Math.log(uniformAt(sc.k0[i], sc.k1[i], c));
    st[o + 1] = -1;
    st[o + 2] = 0;
    st[o + 3] = 0;
    batch.gasCounter[i] = c + 1;
  }

  const k: HardSphereKernel = {
    depth: 0, limit2: 0, rate: 0,
    enter(batch: IonBatch, i: number): void {
      if (batch !== bound) bind(batch);
      if (owner[i] !== batch.index[i]) claim(batch, i);
      const o = STRIDE * i;
      k.depth = st[o]; k.limit2 = st[o + 1]; k.rate = st[o + 2];
    },
    collide,
    leave(batch: IonBatch, i: number, depth: number): void {
      if (batch !== bound) bind(batch);
      st[STRIDE * i] = depth;
    },
    step: hardSphereStep,
  };

  // Slow path: a raise of the bound and/or at least one candidate within this step.
  function collide(batch: IonBatch, i: number, dt: number, s: number): void {
    if (batch !== bound) bind(batch);
    const o = STRIDE * i;
    const k0 = sc.k0[i];
    const k1 = sc.k1[i];
    const wGas = gasMass / (batch.mass[i] + gasMass);
    let c = batch.gasCounter[i];
    let vx = batch.vx[i];
    let vy = batch.vy[i];
    let vz = batch.vz[i];
    let v2 = vx * vx + vy * vy + vz * vz;
    let speed = Math.sqrt(v2);
    let limit2 = st[o + 1];
    let rate = st[o + 2];
    let vHat = st[o + 3];
    if (!(v2 <= limit2)) {
      vHat = Math.max(RAISE * speed, floorSpeed);
      limit2 = vHat * vHat;
      rate = nSigma * (vHat + meanGasSpeed);
    }
    let left = dt;
    let hits = 0;
    // A non-finite speed (an ion already lost to a diverging field) gets no collisions rather than
    // an endless loop.
    while (s <= rate * left && rate < Infinity) {
      left -= s / rate;
      const u0 = uniformAt(k0, k1, c);
      const share = u0 * (vHat + meanGasSpeed);
      c += DRAWS_PER_CANDIDATE;
      if (share < speed + meanGasSpeed) {
        const u1 = uniformAt(k0, k1, c - 8);
        const u2 = uniformAt(k0, k1, c - 7);
        const u3 = uniformAt(k0, k1, c - 6);
        const u4 = uniformAt(k0, k1, c - 5);
        let gx: number, gy: number, gz: number, partnerSpeed: number;
        if (share < speed) {
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
          const sn = Math.sqrt(Math.max(0, 1 - ct * ct));
          const ph = TWO_PI * u4;
          gx = vx - partnerSpeed * sn * Math.cos(ph);
          gy = vy - partnerSpeed * sn * Math.sin(ph);
          gz = vz - partnerSpeed * ct;
        }
        const g = Math.sqrt(gx * gx + gy * gy + gz * gz);
        if (uniformAt(k0, k1, c - 4) * (speed + partnerSpeed) < g) {
          const ct = 2 * uniformAt(k0, k1, c - 3) - 1;
          const sn = Math.sqrt(Math.max(0, 1 - ct * ct));
          const ph = TWO_PI * uniformAt(k0, k1, c - 2);
          vx += wGas * (g * sn * Math.cos(ph) - gx);
          vy += wGas * (g * sn * Math.sin(ph) - gy);
          vz += wGas * (g * ct - gz);
          v2 = vx * vx + vy * vy + vz * vz;
          speed = Math.sqrt(v2);
          vHat = Math.max(RAISE * speed, floorSpeed);
          limit2 = vHat * vHat;
          rate = nSigma * (vHat + meanGasSpeed);
          hits++;
        }
      }
      s = -Math.log(uniformAt(k0, k1, c - 1));
    }
    s -= rate * left;
    st[o] = s; st[o + 1] = limit2; st[o + 2] = rate; st[o + 3] = vHat;
    k.depth = s; k.limit2 = limit2; k.rate = rate;
    batch.vx[i] = vx;
    batch.vy[i] = vy;
    batch.vz[i] = vz;
    batch.gasCounter[i] = c;
    batch.collisions[i] += hits;
  }

  // Plain GasStep: v², one compare and one multiply-add on the ion's optical depth per call.
  function hardSphereStep(batch: IonBatch, i: number, dt: number): void {
    if (batch !== bound) bind(batch);
    if (owner[i] !== batch.index[i]) claim(batch, i);
    const vx = batch.vx[i];
    const vy = batch.vy[i];
    const vz = batch.vz[i];
    const o = STRIDE * i;
    const s = st[o];
    const d = s - st[o + 2] * dt;
    if (vx * vx + vy * vy + vz * vz <= st[o + 1] && d > 0) st[o] = d;
    else collide(batch, i, dt, s);
  }

  return k;
}
