// One batch of ions through the stages, start to fate. Pure computation: the same function runs
// in the main thread (--workers 1) and in worker threads, so results do not depend on where.

import type { Scene } from '../scene/types.js';
import { allocateBatch, Fate } from '../core/batch.js';
import { Exit, type IonCursor, type StepContext } from '../core/cursor.js';
import type { GasFactory } from './gas-hooks.js';
import { TrajectoryRecorder } from './recorder.js';
import { EnsembleHistory } from './history.js';
import { populationOffsets, startIon } from './start.js';
import { kindOf, rfOf } from '../stages/registry.js';
import { detectorOf } from '../scene/detector.js';
import { afterLeaving, fateOf } from './exits.js';
import { dcPotential, isElectrostatic, stageBasePotentials, stageFields } from './potential.js';
import { ELECTRONVOLT } from '../units/constants.js';

export interface BatchResult {
  batch: number;
  start: number;
  count: number;
  /** Per-ion columns (typed arrays, transferable). */
  ion: Int32Array; population: Int32Array; mz: Float64Array; charge: Int32Array;
  x0: Float64Array; y0: Float64Array; z0: Float64Array; vx0: Float64Array; vy0: Float64Array; vz0: Float64Array;
  fate: Int8Array; end_time: Float64Array;
  end_x: Float64Array; end_y: Float64Array; end_z: Float64Array;
  end_vx: Float64Array; end_vy: Float64Array; end_vz: Float64Array;
  end_ke_ev: Float64Array; end_stage: Int32Array; collisions: Float64Array;
  /** RF phase Ω(t + τ) + φ mod 2π, rad, as the ion entered its first RF stage; NaN when it never did. */
  entry_rf_phase: Float64Array;
  /** Recorded points, 8 doubles each (ion, t, x, y, z, vx, vy, vz), or null. */
  trajectory: Float64Array | null;
  /** Ensemble-history sums (see history.ts). */
  history: Float64Array;
  steps: number;
  /** Largest relative energy error in an electrostatic-only scene, else 0. */
  energyError: number;
}


export function trackBatch(scene: Scene, batchIndex: number, start: number, count: number, gasFor: GasFactory): BatchResult {
  const b = allocateBatch(count);
  const offsets = populationOffsets(scene);
  const run = scene.run;
  const rec = run.recordEvery > 0 ? new TrajectoryRecorder(Math.min(1 << 16, count * 64)) : null;
  const hist = new EnsembleHistory(run.historyEvery, run.maxTime, scene.ions.length);
  const ctx: StepContext = { batch: b, maxTime: run.maxTime, recordEvery: run.recordEvery, ...(run.recordSpacing ? { recordSpacing: run.recordSpacing } : {}), rec, hist, gas: null, gasField: null, hardSphere: null };
  const gasSteps = scene.stages.map((_, s) => gasFor(s));
  // Each stage's kind, looked up once: the loop below asks it when an ion enters the stage.
  const kinds = scene.stages.map(kindOf);
  const drives = scene.stages.map(rfOf);
  const detectorRadius = detectorOf(scene).radius;
  const fields = stageFields(scene);
  const electrostatic = isElectrostatic(scene, fields);
  const base = stageBasePotentials(scene, fields);
  const res = allocateResult(batchIndex, start, count);
  let energyError = 0;
  let steps = 0;
  let pop = 0;
  const c: IonCursor = { ion: 0, slot: 0, m: 0, q: 0, tau: 0, t: 0, x: 0, y: 0, z: 0, vx: 0, vy: 0, vz: 0, steps: 0, sinceRecord: 0, nextHist: 0 };

  for (let slot = 0; slot < count; slot++) {
    const ion = start + slot;
    while (ion >= offsets[pop + 1]) pop++;
    const p = scene.ions[pop];
    hist.population = pop;
    c.tau = startIon(scene, b, slot, ion, pop, p);
    c.ion = ion; c.slot = slot; c.m = b.mass[slot]; c.q = b.charge[slot];
    c.t = 0; c.x = b.x[slot]; c.y = b.y[slot]; c.z = b.z[slot];
    c.vx = b.vx[slot]; c.vy = b.vy[slot]; c.vz = b.vz[slot];
    c.steps = 0; c.sinceRecord = 0; c.nextHist = 0;
    res.ion[slot] = ion; res.population[slot] = pop; res.mz[slot] = p.mz; res.charge[slot] = p.charge;
    res.x0[slot] = c.x; res.y0[slot] = c.y; res.z0[slot] = c.z;
    res.vx0[slot] = c.vx; res.vy0[slot] = c.vy; res.vz0[slot] = c.vz;
    let s = b.stage[slot];
    const e0 = electrostatic ? 0.5 * c.m * (c.vx * c.vx + c.vy * c.vy + c.vz * c.vz) + c.q * dcPotential(fields, base, s, c.x, c.y, c.z) : 0;
    rec?.push(ion, c.t, c.x, c.y, c.z, c.vx, c.vy, c.vz);
    // Sample t = 0 before the first kernel runs.
    if (hist.points > 0) { hist.add(0, c.m, c.x, c.y, c.z, c.vx, c.vy, c.vz); c.nextHist = 1; }
    let fate: number = Fate.alive;
    let entryPhase = NaN;
    // A start drawn outside every stage (a spread reaching past the instrument) is lost at once.
    if (s < 0) { fate = Fate.hit; s = 0; }
    for (; fate === Fate.alive;) {
      const st = scene.stages[s];
      const rf = drives[s];
      if (rf !== undefined && entryPhase !== entryPhase) entryPhase = rfPhase(rf.frequency, rf.phase, c.t + c.tau);
      ctx.gas = gasSteps[s].step;
      ctx.gasField = gasSteps[s].field;
      ctx.hardSphere = gasSteps[s].hardSphere;
      const kind = kinds[s];
      const code = kind.track(st, c, ctx, run);
      if (code === Exit.hit) { fate = Fate.hit; break; }
      if (code === Exit.time) { fate = Fate.alive; break; }
      if (code === Exit.detected) { fate = Fate.detected; break; }
      const next = afterLeaving(scene.stages, kinds, s, code === Exit.forward, c.x, c.y, detectorRadius);
      if (next < 0) { fate = fateOf(next); break; }
      s = next;
      if (rec !== null) rec.push(ion, c.t, c.x, c.y, c.z, c.vx, c.vy, c.vz);
    }
    if (rec !== null) rec.push(ion, c.t, c.x, c.y, c.z, c.vx, c.vy, c.vz);
    steps += c.steps;
    res.fate[slot] = fate; res.end_time[slot] = c.t;
    res.end_x[slot] = c.x; res.end_y[slot] = c.y; res.end_z[slot] = c.z;
    res.end_vx[slot] = c.vx; res.end_vy[slot] = c.vy; res.end_vz[slot] = c.vz;
    const ke = 0.5 * c.m * (c.vx * c.vx + c.vy * c.vy + c.vz * c.vz);
    res.end_ke_ev[slot] = ke / ELECTRONVOLT;
    res.end_stage[slot] = s;
    res.collisions[slot] = b.collisions[slot];
    res.entry_rf_phase[slot] = entryPhase;
    if (electrostatic) {
      const e1 = ke + c.q * dcPotential(fields, base, s, c.x, c.y, c.z);
      const ref = Math.max(Math.abs(e0), Math.abs(e1), ke);
      if (ref > 0) energyError = Math.max(energyError, Math.abs(e1 - e0) / ref);
    }
  }
  res.trajectory = rec ? rec.view().slice() : null;
  res.history = hist.sums;
  res.steps = steps;
  res.energyError = energyError;
  return res;
}

/** Ω·t + φ reduced to [0, 2π), Ω = 2πf (t includes the ion's start offset τ). */
export function rfPhase(frequency: number, phase: number, t: number): number {
  const TWO_PI = 2 * Math.PI;
  const th = TWO_PI * frequency * t + phase;
  const r = th - TWO_PI * Math.floor(th / TWO_PI);
  return r >= TWO_PI ? r - TWO_PI : r;
}

function allocateResult(batch: number, start: number, n: number): BatchResult {
  const f = () => new Float64Array(n);
  return {
    batch, start, count: n,
    ion: new Int32Array(n), population: new Int32Array(n), mz: f(), charge: new Int32Array(n),
    x0: f(), y0: f(), z0: f(), vx0: f(), vy0: f(), vz0: f(),
    fate: new Int8Array(n), end_time: f(), end_x: f(), end_y: f(), end_z: f(),
    end_vx: f(), end_vy: f(), end_vz: f(), end_ke_ev: f(), end_stage: new Int32Array(n), collisions: f(), entry_rf_phase: f(),
    trajectory: null, history: new Float64Array(0), steps: 0, energyError: 0,
  };
}
