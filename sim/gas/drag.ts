// Drag model: viscous force −(|q|/K)·v plus the matching thermal random force, i.e. the Langevin
// equation m dv = −mγ v dt + q E dt + m (2γkT/m)^½ dW, γ = |q|/(mK), whose noise strength follows
// from fluctuation–dissipation (Einstein relation D = K kT/|q|). Integrated exactly over a step as an
// Ornstein–Uhlenbeck process (S. Chandrasekhar, Rev. Mod. Phys. 15, 1 (1943), ch. II):
//
// velocity only (field handled by the engine's split step, makeDragStep):
//   v ← v e^{−h} + (kT/m (1 − e^{−2h}))^½ ξ,           h = γ dt;
//
// uniform field E (makeDragFieldStep), exact for position and velocity: with the drift velocity
// w = (q/(mγ)) E = sign(q) K E and u = v − w, per axis
//   v' = w + u e^{−h} + σ_v ξ1,
//   x' = x + w dt + u (1 − e^{−h})/γ + (σ_xv/σ_v) ξ1 + σ_x|v ξ2,
//   σ_v² = kT/m (1 − e^{−2h}),  σ_xv = kT/(mγ) (1 − e^{−h})²,
//   σ_x² = kT/(mγ²) (2h − 3 + 4e^{−h} − e^{−2h}),
//   σ_x|v² = σ_x² − σ_xv²/σ_v² = kT/(mγ²) (2h − 4 tanh(h/2))   (algebra on the above).
// In a non-uniform or RF field the engine alternates its field step with makeDragStep (operator
// splitting; exact in the limits E → const or dt → 0).

import type { IonBatch } from '../core/batch.js';
import { BOLTZMANN } from '../units/constants.js';
import { uniformAt } from '../random/counter.js';
import { checkGasSpec, GasSpecError, type GasFieldStep, type GasSpec, type GasStep } from './model.js';
import { masonSchampMobility, mobilityFromReduced, numberDensity, reducedMass } from './mobility.js';
import { GasScratchTable, type GasScratch } from './scratch.js';

/** Mobility K (m^2/(V s)) of an ion of this mass and charge in `gas` at its p and T. */
export function gasMobility(gas: GasSpec, ionMassKg: number, chargeC: number): number {
  if (gas.reducedMobility !== undefined) return mobilityFromReduced(gas.reducedMobility, gas.pressurePa, gas.temperatureK);
  if (gas.crossSectionM2 === undefined) throw new GasSpecError('cross_section', 'is required to derive the mobility (or give reduced_mobility)');
  return masonSchampMobility(ionMassKg, chargeC, gas.massKg, gas.temperatureK,
    numberDensity(gas.pressurePa, gas.temperatureK), gas.crossSectionM2);
}

/**
 * Friction coefficient ζ = m γ = |q|/K, kg/s. From Mason–Schamp it is charge-free,
 * ζ = (16/3) N Ω (μ kT/(2π))^½, so a neutral still thermalises; with a given reduced mobility a
 * neutral (q = 0) feels no drag.
 */
export function dragFriction(gas: GasSpec, ionMassKg: number, chargeC: number): number {
  if (gas.reducedMobility !== undefined) {
    return Math.abs(chargeC) / mobilityFromReduced(gas.reducedMobility, gas.pressurePa, gas.temperatureK);
  }
  if (gas.crossSectionM2 === undefined) throw new GasSpecError('cross_section', 'is required to derive the mobility (or give reduced_mobility)');
  const mu = reducedMass(ionMassKg, gas.massKg);
  return (16 / 3) * numberDensity(gas.pressurePa, gas.temperatureK) * gas.crossSectionM2
    * Math.sqrt((mu * BOLTZMANN * gas.temperatureK) / (2 * Math.PI));
}

/** Standard normals from uniforms (Box & Muller, Ann. Math. Stat. 29, 610 (1958)). */
function boxMullerRadius(u: number): number {
  return Math.sqrt(-2 * Math.log(u));
}

/** 2h − 4 tanh(h/2), with its series below h = 0.01 where the difference cancels. */
export function conditionalPositionFactor(h: number): number {
  if (h < 1e-2) {
    const h2 = h * h;
    return h * h2 * (1 / 6 - h2 / 60 + (17 * h2 * h2) / 10080);
  }
  return 2 * h - 4 * Math.tanh(h / 2);
}

function checkDrag(gas: GasSpec): void {
  checkGasSpec(gas);
  if (gas.model !== 'drag') throw new GasSpecError('model', `expects drag here, got '${gas.model}'`);
}

/** Coefficients for one (mass, charge, dt); recomputed only when one of them changes. */
class DragCoefficients {
  mass = NaN; charge = NaN; dt = NaN;
  gamma = 0; decay = 0; sigmaV = 0; drift = 0; relax = 0; xFromXi1 = 0; xFromXi2 = 0;
  constructor(private readonly gas: GasSpec, private readonly kT: number) {}

  update(mass: number, charge: number, dt: number): void {
    if (mass === this.mass && charge === this.charge && dt === this.dt) return;
    this.mass = mass; this.charge = charge; this.dt = dt;
    const zeta = dragFriction(this.gas, mass, charge);
    const gamma = zeta / mass;
    if (!(gamma > 0)) {
      // No friction (a neutral with a given reduced mobility): free flight, no thermal kicks.
      this.gamma = 0; this.decay = 1; this.sigmaV = 0; this.drift = 0; this.relax = dt;
      this.xFromXi1 = 0; this.xFromXi2 = 0;
      return;
    }
    const h = gamma * dt;
    const thermal = Math.sqrt(this.kT / mass);
    const oneMinusE = -Math.expm1(-h);
    const e = 1 - oneMinusE;
    this.gamma = gamma;
    this.decay = Math.exp(-h);
    this.sigmaV = thermal * Math.sqrt(-Math.expm1(-2 * h));
    this.drift = charge / zeta; // w = q E/(m γ) = sign(q) K E
    this.relax = oneMinusE / gamma;
    // σ_xv/σ_v = (kT/m)^½/γ · (1 − e^{−h})^{3/2}/(1 + e^{−h})^½
    this.xFromXi1 = (thermal / gamma) * Math.pow(oneMinusE, 1.5) / Math.sqrt(1 + e);
    this.xFromXi2 = (thermal / gamma) * Math.sqrt(conditionalPositionFactor(h));
  }
}

function bindScratch(table: GasScratchTable) {
  let bound: IonBatch | null = null;
  let sc!: GasScratch;
  return (batch: IonBatch, i: number): GasScratch => {
    if (batch !== bound) {
      sc = table.of(batch);
      bound = batch;
    }
    if (sc.owner[i] !== batch.index[i]) table.claim(sc, batch, i);
    return sc;
  };
}

/** Velocity-only OU step (4 uniforms per call). */
export function makeDragStep(gas: GasSpec, seed: number): GasStep {
  checkDrag(gas);
  const co = new DragCoefficients(gas, BOLTZMANN * gas.temperatureK);
  const scratchFor = bindScratch(new GasScratchTable(seed));
  const TWO_PI = 2 * Math.PI;
  return function dragStep(batch: IonBatch, i: number, dt: number): void {
    const sc = scratchFor(batch, i);
    co.update(batch.mass[i], batch.charge[i], dt);
    const k0 = sc.k0[i];
    const k1 = sc.k1[i];
    const c = batch.gasCounter[i];
    const r1 = co.sigmaV * boxMullerRadius(uniformAt(k0, k1, c));
    const p1 = TWO_PI * uniformAt(k0, k1, c + 1);
    const r2 = co.sigmaV * boxMullerRadius(uniformAt(k0, k1, c + 2));
    const p2 = TWO_PI * uniformAt(k0, k1, c + 3);
    batch.gasCounter[i] = c + 4;
    batch.vx[i] = batch.vx[i] * co.decay + r1 * Math.cos(p1);
    batch.vy[i] = batch.vy[i] * co.decay + r1 * Math.sin(p1);
    batch.vz[i] = batch.vz[i] * co.decay + r2 * Math.cos(p2);
  };
}

/** Exact OU step of position and velocity in a uniform field E, V/m (6 uniforms per call). */
export function makeDragFieldStep(gas: GasSpec, seed: number): GasFieldStep {
  checkDrag(gas);
  const co = new DragCoefficients(gas, BOLTZMANN * gas.temperatureK);
  const scratchFor = bindScratch(new GasScratchTable(seed));
  const TWO_PI = 2 * Math.PI;
  return function dragFieldStep(batch: IonBatch, i: number, dt: number, ex: number, ey: number, ez: number): void {
    const sc = scratchFor(batch, i);
    co.update(batch.mass[i], batch.charge[i], dt);
    const k0 = sc.k0[i];
    const k1 = sc.k1[i];
    const c = batch.gasCounter[i];
    batch.gasCounter[i] = c + 6;
    const ra = boxMullerRadius(uniformAt(k0, k1, c));
    const pa = TWO_PI * uniformAt(k0, k1, c + 1);
    const rb = boxMullerRadius(uniformAt(k0, k1, c + 2));
    const pb = TWO_PI * uniformAt(k0, k1, c + 3);
    const rc = boxMullerRadius(uniformAt(k0, k1, c + 4));
    const pc = TWO_PI * uniformAt(k0, k1, c + 5);
    // ξ1 (velocity-correlated) and ξ2 (conditional position) for x, y, z.
    const n1x = ra * Math.cos(pa), n2x = ra * Math.sin(pa);
    const n1y = rb * Math.cos(pb), n2y = rb * Math.sin(pb);
    const n1z = rc * Math.cos(pc), n2z = rc * Math.sin(pc);
    const wx = co.drift * ex, wy = co.drift * ey, wz = co.drift * ez;
    const ux = batch.vx[i] - wx, uy = batch.vy[i] - wy, uz = batch.vz[i] - wz;
    batch.x[i] += wx * dt + ux * co.relax + co.xFromXi1 * n1x + co.xFromXi2 * n2x;
    batch.y[i] += wy * dt + uy * co.relax + co.xFromXi1 * n1y + co.xFromXi2 * n2y;
    batch.z[i] += wz * dt + uz * co.relax + co.xFromXi1 * n1z + co.xFromXi2 * n2z;
    batch.vx[i] = wx + ux * co.decay + co.sigmaV * n1x;
    batch.vy[i] = wy + uy * co.decay + co.sigmaV * n1y;
    batch.vz[i] = wz + uz * co.decay + co.sigmaV * n1z;
  };
}
