// Initial state of each ion, drawn from its own counter-based stream (seed, ion index, start), so
// an ion starts the same whichever batch or worker it lands in.

import { RandomStream, Purpose } from '../random/counter.js';
import { ionMassKg, ELEMENTARY_CHARGE, ELECTRONVOLT } from '../units/constants.js';
import type { Population, Scene } from '../scene/types.js';
import { Fate, type IonBatch } from '../core/batch.js';
import { firstRf } from '../stages/registry.js';

/** Which population each global ion index belongs to: cumulative counts. */
export function populationOffsets(scene: Scene): number[] {
  const off = [0];
  for (const p of scene.ions) off.push(off[off.length - 1] + p.count);
  return off;
}

/** The stage containing z (the first one whose range holds it); -1 when outside every stage. */
export function stageAt(scene: Scene, z: number): number {
  const st = scene.stages;
  for (let s = 0; s < st.length; s++) if (z >= st[s].zStart && z < st[s].zEnd) return s;
  if (st.length > 0 && z === st[st.length - 1].zEnd) return st.length - 1;
  return -1;
}

/** RF reference angular frequency: the first RF stage's; ion start phases are times on its clock. */
export function referenceOmega(scene: Scene): number {
  const rf = firstRf(scene.stages);
  return rf ? 2 * Math.PI * rf.rf.frequency : 0;
}

/**
 * Fill slot `slot` of the batch with global ion `ion` of population `pop`.
 * Returns the ion's RF start offset τ (s): its field phase in any RF stage is Ω(t + τ) + φ.
 */
export function startIon(scene: Scene, b: IonBatch, slot: number, ion: number, popIndex: number, pop: Population): number {
  const rng = new RandomStream(scene.seed, ion, Purpose.start);
  const p = pop.position;
  const gx = rng.normal();
  const gy = rng.normal();
  const gz = rng.normal();
  b.index[slot] = ion;
  b.population[slot] = popIndex;
  b.mass[slot] = ionMassKg(pop.mz, pop.charge);
  b.charge[slot] = pop.charge * ELEMENTARY_CHARGE;
  b.t[slot] = 0;
  b.x[slot] = p.x + p.spread * gx;
  b.y[slot] = p.y + p.spread * gy;
  b.z[slot] = p.z + p.spreadZ * gz;
  // Kinetic energy: Gaussian about the mean, folded at zero (a negative energy has no meaning).
  const ke = Math.abs(pop.energy + pop.energySpread * rng.normal());
  const speed = Math.sqrt((2 * ke * ELECTRONVOLT) / b.mass[slot]);
  let ux: number, uy: number, uz: number;
  if (pop.direction === 'isotropic') {
    // Uniform on the sphere (Marsaglia-free form: cos θ uniform in [-1, 1]).
    const c = 2 * rng.uniform() - 1;
    const s = Math.sqrt(Math.max(0, 1 - c * c));
    const phi = 2 * Math.PI * rng.uniform();
    ux = s * Math.cos(phi); uy = s * Math.sin(phi); uz = c;
  } else {
    // Transverse direction components Gaussian with sigma angle_spread: the polar angle is
    // Rayleigh-distributed, the azimuth uniform.
    const tx = pop.angleSpread * rng.normal();
    const ty = pop.angleSpread * rng.normal();
    const theta = Math.hypot(tx, ty);
    const s = Math.sin(theta);
    ux = theta > 0 ? (s * tx) / theta : 0;
    uy = theta > 0 ? (s * ty) / theta : 0;
    uz = Math.cos(theta);
  }
  b.vx[slot] = speed * ux;
  b.vy[slot] = speed * uy;
  b.vz[slot] = speed * uz;
  b.fate[slot] = Fate.alive;
  b.stage[slot] = stageAt(scene, b.z[slot]);
  b.gasCounter[slot] = 0;
  b.collisions[slot] = 0;
  const omega = referenceOmega(scene);
  if (omega === 0) return 0;
  const phase = pop.rfPhase === 'uniform' ? 2 * Math.PI * rng.uniform() : pop.rfPhase;
  return phase / omega;
}
