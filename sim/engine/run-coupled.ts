// Runs with space charge: the ions are coupled by their Coulomb field, so the whole ensemble
// advances together through the composed stages (coupled-flight.ts) instead of ion by ion. Any
// scene whose stage kinds give a coupling (sim/stages/kind.ts) runs so, with gas, RF ramps and
// supplementary AC, trajectories and the ensemble history. The space-charge figures: the step and
// the softening used; for a scene of one RF trap the trap designer's capacity numbers (secular
// frequencies about the centroid and their shift from the single-ion Mathieu value, RMS cloud
// size, ions lost); wherever ions are detected (a TOF packet, a mass scan) the arrival time and
// spread per population against the same ions tracked without space charge.

import { totalmem } from 'node:os';
import type { Scene } from '../scene/types.js';
import { isTrap } from '../stages/guards.js';
import { kindOf } from '../stages/registry.js';
import { SceneError } from '../scene/schema.js';
import { allocateBatch, Fate, type IonBatch } from '../core/batch.js';
import { populationOffsets, startIon } from './start.js';
import { cloudMoments, defaultSoftening, directSolver, treeSolver, type Ensemble, type FieldSolver } from '../spacecharge/ensemble-step.js';
import { TrapCloudObserver } from '../spacecharge/trap-cloud.js';
import { ParallelDirect } from '../spacecharge/parallel.js';
import { ParallelTree } from '../spacecharge/parallel-tree.js';
import { floquet } from '../mathieu/floquet.js';
import { mathieuParameters } from '../mathieu/parameters.js';
import { ELECTRONVOLT } from '../units/constants.js';
import { trackBatch, type BatchResult } from './track.js';
import { CoupledFlight } from './coupled-flight.js';
import { chooseCoupledStep, type CoupledStep } from './coupled-step.js';
import { gasFactory } from './gas-hooks.js';
import { TrajectoryRecorder } from './recorder.js';
import { EnsembleHistory } from './history.js';

export interface CoupledResult {
  result: BatchResult;
  figures: Record<string, unknown>;
  steps: number;
  /** The run stopped before max_time (a stop signal): the time it reached, s. */
  stoppedAt?: number;
  warnings: string[];
}

/** What a coupled run starts from, prepared before anything is written. */
export interface CoupledPlan {
  batch: IonBatch;
  step: CoupledStep;
  softening: number;
}

/**
 * Bytes a coupled run holds per ion besides recorded points: the batch and result columns
 * (16 + 24 doubles), the stepper's accelerations, gathered and compacted copies (18 doubles),
 * the Barnes–Hut tree (~10 doubles an ion) and the reference flight without space charge (24).
 */
export const COUPLED_BYTES_PER_ION = 8 * (16 + 24 + 18 + 10 + 24);
/** The trap figures' secular spectra: 2 axes × 161 frequencies × (re, im) doubles an ion. */
export const TRAP_SPECTRUM_BYTES_PER_ION = 2 * 161 * 2 * 8;
/** A recorded point in the recorder, its reordering and its columns. */
export const COUPLED_POINT_BYTES = 3 * 64;
/** Share of the machine's memory a run may plan to use. */
const MEMORY_SHARE = 0.8;

/** Checks that need only the scene (before any ion is drawn): one-line errors. */
export function checkCoupledScene(scene: Scene, opts: { memory?: number; pointsPerIon?: number } = {}): void {
  scene.stages.forEach((st, i) => {
    if (kindOf(st).coupling === undefined) {
      throw new SceneError(`stages.${st.sceneIndex ?? i} (${st.type}): space_charge is not available with this stage kind yet (its kind gives no coupling); run the scene without space_charge`);
    }
  });
  if (scene.run.integrator === 'dopri5') throw new SceneError('run.integrator: a space-charge run steps all ions together with Störmer–Verlet; leave out integrator: dopri5');
  if (scene.stages.some((st) => kindOf(st).rf(st) !== undefined) && scene.run.stepsPerCycle < 20) {
    throw new SceneError(`run.steps_per_cycle: space-charge runs need at least 20, got ${scene.run.stepsPerCycle}`);
  }
  const total = scene.ions.reduce((a, p) => a + p.count, 0);
  const need = coupledMemory(scene, total, opts.pointsPerIon ?? 0);
  const have = MEMORY_SHARE * (opts.memory ?? totalmem());
  if (need > have) {
    const gb = (b: number) => `${Number((b / 1e9).toPrecision(3))} GB`;
    throw new SceneError(`space_charge: the coupled run of ${total} ions needs about ${gb(need)} of memory, more than the ${gb(have)} this machine can give (${Math.round(MEMORY_SHARE * 100)}% of ${gb(have / MEMORY_SHARE)}); use fewer ions with a larger weight${opts.pointsPerIon ? ', or record fewer points (run.record_every)' : ''}`);
  }
}

/** Bytes a coupled run of `total` ions holds at once. */
export function coupledMemory(scene: Scene, total: number, pointsPerIon: number): number {
  const trap = scene.stages.length === 1 && isTrap(scene.stages[0]);
  return total * (COUPLED_BYTES_PER_ION + (trap ? TRAP_SPECTRUM_BYTES_PER_ION : 0) + pointsPerIon * COUPLED_POINT_BYTES);
}

/** Draws the ions, checks the softening against the cloud and chooses the step. */
export function prepareCoupled(scene: Scene): CoupledPlan {
  checkCoupledScene(scene);
  const sc = scene.spaceCharge!;
  const total = scene.ions.reduce((a, p) => a + p.count, 0);
  const b = allocateBatch(total);
  const offsets = populationOffsets(scene);
  let pop = 0;
  for (let i = 0; i < total; i++) {
    while (i >= offsets[pop + 1]) pop++;
    startIon(scene, b, i, i, pop, scene.ions[pop]);
    // A start drawn outside every stage is lost at once, as in the uncoupled loop (track.ts).
    if (b.stage[i] < 0) { b.fate[i] = Fate.hit; b.stage[i] = 0; }
  }
  const e = batchEnsemble(b);
  const m = cloudMoments(e);
  const softening = sc.softening ?? defaultSoftening(e);
  if (sc.softening !== undefined && m.n > 1 && sc.softening > m.sr) {
    throw new SceneError(`space_charge.softening: ${mm(sc.softening)} is larger than the starting ion cloud (RMS radius ${mm(m.sr)}), which would smooth its Coulomb field away; give a length below ${mm(m.sr)} or leave it out (default 1e-3 × the mean ion spacing)`);
  }
  const rfHz = fastestRf(scene);
  const step = chooseCoupledStep(e, sc.weight, scene.run.maxTime, scene.run.stepsPerCycle, rfHz, scene.run.stepNoRfSet ? scene.run.stepNoRf : undefined);
  if (scene.run.recordEvery > 0) {
    // Now the step is known, with the recorded points: the start, every record_every steps, each plane crossed and the end.
    checkCoupledScene(scene, { pointsPerIon: Math.ceil(step.steps / scene.run.recordEvery) + 2 * scene.stages.length + 2 });
  }
  return { batch: b, step, softening };
}

const mm = (m: number) => `${Number((m * 1e3).toPrecision(3))} mm`;

function fastestRf(scene: Scene): number | undefined {
  let f: number | undefined;
  for (const st of scene.stages) {
    const hz = kindOf(st).coupling?.(st).rfHz;
    if (hz !== undefined && (f === undefined || hz > f)) f = hz;
  }
  return f;
}

function batchEnsemble(b: IonBatch): Ensemble {
  const alive = new Uint8Array(b.n);
  for (let i = 0; i < b.n; i++) alive[i] = b.fate[i] === Fate.alive ? 1 : 0;
  return { n: b.n, x: b.x, y: b.y, z: b.z, vx: b.vx, vy: b.vy, vz: b.vz, mass: b.mass, charge: b.charge, alive };
}

export interface CoupledRunOptions {
  workers: number;
  stopped?: () => boolean;
  progress?: (done: number, total: number) => void;
}

export async function runCoupled(scene: Scene, plan: CoupledPlan, opts: CoupledRunOptions): Promise<CoupledResult> {
  const sc = scene.spaceCharge!;
  const b = plan.batch;
  const total = b.n;
  const res = emptyResult(total);
  for (let i = 0; i < total; i++) {
    res.ion[i] = i; res.population[i] = b.population[i]; res.mz[i] = scene.ions[b.population[i]].mz; res.charge[i] = scene.ions[b.population[i]].charge;
    res.x0[i] = b.x[i]; res.y0[i] = b.y[i]; res.z0[i] = b.z[i];
    res.vx0[i] = b.vx[i]; res.vy0[i] = b.vy[i]; res.vz0[i] = b.vz[i];
  }
  const run = scene.run;
  const rec = run.recordEvery > 0 ? new TrajectoryRecorder(Math.min(1 << 20, total * 64)) : null;
  const hist = new EnsembleHistory(run.historyEvery, run.maxTime, scene.ions.length);
  const flight = new CoupledFlight(scene, b);
  const trap = trapObserver(scene, flight.ensemble, plan.step);
  const solver: FieldSolver = sc.method === 'direct'
    ? (opts.workers > 1 ? await ParallelDirect.create(opts.workers, total) : directSolver)
    : (opts.workers > 1 ? await ParallelTree.create(opts.workers, total, sc.theta ?? 0.5) : treeSolver(sc.theta ?? 0.5));
  let end;
  try {
    end = await flight.run({
      h: plan.step.h, steps: plan.step.steps, solver, softening: plan.softening, weight: sc.weight,
      gasFor: gasFactory(scene), rec, hist,
      onStep: trap ? (t, e) => trap.observer.onStep(t, e) : undefined,
      stopped: opts.stopped,
      progress: opts.progress ? (k, n) => opts.progress!(Math.floor((total * k) / n), total) : undefined,
    });
  } finally {
    if (solver instanceof ParallelDirect || solver instanceof ParallelTree) await solver.close();
  }
  for (let i = 0; i < total; i++) {
    res.fate[i] = b.fate[i];
    res.end_time[i] = end.endTime[i];
    res.end_x[i] = b.x[i]; res.end_y[i] = b.y[i]; res.end_z[i] = b.z[i];
    res.end_vx[i] = b.vx[i]; res.end_vy[i] = b.vy[i]; res.end_vz[i] = b.vz[i];
    res.end_ke_ev[i] = (0.5 * b.mass[i] * (b.vx[i] ** 2 + b.vy[i] ** 2 + b.vz[i] ** 2)) / ELECTRONVOLT;
    res.end_stage[i] = b.stage[i];
    res.collisions[i] = b.collisions[i];
    res.entry_rf_phase[i] = end.entryPhase[i];
  }
  res.steps = end.ionSteps;
  res.history = hist.sums;
  res.trajectory = rec ? byIon(rec.view(), total) : null;
  const lost = countFate(res.fate, Fate.hit);
  const figures: Record<string, unknown> = {
    method: sc.method,
    weight: sc.weight,
    simulated_ions: total,
    real_charges: scene.ions.reduce((a, p) => a + p.count * sc.weight * Math.abs(p.charge), 0),
    softening_m: plan.softening,
    step: { h_s: plan.step.h, steps: plan.step.steps, chosen_from: plan.step.from, plasma_period_s: plan.step.plasma_period_s, nearest_neighbour_m: plan.step.nearest_neighbour_m, pair_time_s: plan.step.pair_time_s },
    lost,
  };
  if (trap) {
    const fig = trap.observer.figures(flight.ensemble, plan.softening);
    Object.assign(figures, {
      secular_frequency_z_hz: fig.secularZHz,
      secular_frequency_r_hz: fig.secularRHz,
      single_ion_secular_frequency_z_hz: trap.fz,
      single_ion_secular_frequency_r_hz: trap.fr,
      frequency_shift_z: fig.secularZHz / trap.fz - 1,
      frequency_shift_r: fig.secularRHz / trap.fr - 1,
      rms_z_m: fig.rmsZ,
      rms_radius_m: fig.rmsR,
      note: 'secular lines from the spectrum of each ion about the centroid (Hann window); single-ion values from the Mathieu β of population 0',
    });
  }
  if (countFate(res.fate, Fate.detected) > 0 && !end.stoppedEarly) figures.arrivals = arrivalFigures(scene, res);
  return { result: res, figures, steps: res.steps, warnings: end.warnings, ...(end.stoppedEarly ? { stoppedAt: end.t } : {}) };
}

/** For a scene of one RF trap: the capacity figures' observer and the single-ion secular lines. */
function trapObserver(scene: Scene, e: Ensemble, step: CoupledStep) {
  const st = scene.stages[0];
  if (scene.stages.length !== 1 || !isTrap(st)) return null;
  // Search bands around the single-ion secular lines of the first population (Mathieu β).
  const p0 = scene.ions[0];
  const [qaZ, qaR] = mathieuParameters({ analyzer: 'trap', r0: st.r0, z0: st.z0, freq: st.rf.frequency, rf: st.rf.amplitude, dc: st.dc, mz: p0.mz, charge: p0.charge });
  const bz = floquet(qaZ.a, qaZ.q).beta;
  const br = floquet(qaR.a, qaR.q).beta;
  if (bz === null || br === null) throw new SceneError(`ions.0: m/z ${p0.mz} is not stable in the trap (q_z = ${qaZ.q.toFixed(3)}); space-charge figures need a stored species`);
  const fz = (bz * st.rf.frequency) / 2, fr = (br * st.rf.frequency) / 2;
  const observer = new TrapCloudObserver(e, {
    rfHz: st.rf.frequency, duration: scene.run.maxTime, stepsPerCycle: scene.run.stepsPerCycle, steps: step.steps,
    bandZ: [0.3 * fz, 1.3 * fz], bandR: [0.1 * fr, 1.3 * fr],
  });
  return { observer, fz, fr };
}

/**
 * Arrival time and spread of the detected ions per population, with space charge and for the
 * same ions (same starts, same gas streams) tracked one by one without it (track.ts): the shift
 * of the mean and the growth of the RMS spread are the space-charge effect.
 */
function arrivalFigures(scene: Scene, res: BatchResult) {
  const single = { ...scene, spaceCharge: undefined };
  const ref = trackBatch(single, 0, 0, res.count, gasFactory(single));
  return scene.ions.map((p, k) => {
    const a = moments(res, k), r = moments(ref, k);
    return {
      population: k, mz: p.mz, detected: a.n,
      mean_arrival_s: a.mean, arrival_rms_s: a.rms,
      single_ion_detected: r.n, single_ion_mean_arrival_s: r.mean, single_ion_arrival_rms_s: r.rms,
      arrival_shift_s: a.mean !== null && r.mean !== null ? a.mean - r.mean : null,
      arrival_rms_ratio: a.rms !== null && r.rms !== null && r.rms > 0 ? a.rms / r.rms : null,
    };
  });
}

function moments(r: BatchResult, pop: number) {
  let n = 0, s = 0;
  for (let i = 0; i < r.count; i++) if (r.population[i] === pop && r.fate[i] === Fate.detected) { n++; s += r.end_time[i]; }
  const mean = n > 0 ? s / n : null;
  let v = 0;
  for (let i = 0; i < r.count; i++) if (r.population[i] === pop && r.fate[i] === Fate.detected) v += (r.end_time[i] - mean!) ** 2;
  return { n, mean, rms: n > 1 ? Math.sqrt(v / n) : null };
}

function countFate(f: Int8Array, code: number): number {
  let k = 0;
  for (let i = 0; i < f.length; i++) if (f[i] === code) k++;
  return k;
}

/** Points recorded time by time (8 doubles each) reordered ion by ion, time order kept (a stable counting sort). */
function byIon(d: Float64Array, ions: number): Float64Array {
  const n = d.length / 8;
  const start = new Int32Array(ions + 1);
  for (let k = 0; k < n; k++) start[d[8 * k] + 1]++;
  for (let i = 0; i < ions; i++) start[i + 1] += start[i];
  const out = new Float64Array(d.length);
  for (let k = 0; k < n; k++) {
    const at = 8 * start[d[8 * k]]++;
    out.set(d.subarray(8 * k, 8 * k + 8), at);
  }
  return out;
}

function emptyResult(n: number): BatchResult {
  const f = () => new Float64Array(n);
  return {
    batch: 0, start: 0, count: n,
    ion: new Int32Array(n), population: new Int32Array(n), mz: f(), charge: new Int32Array(n),
    x0: f(), y0: f(), z0: f(), vx0: f(), vy0: f(), vz0: f(),
    fate: new Int8Array(n), end_time: f(), end_x: f(), end_y: f(), end_z: f(),
    end_vx: f(), end_vy: f(), end_vz: f(), end_ke_ev: f(), end_stage: new Int32Array(n), collisions: f(), entry_rf_phase: f(),
    trajectory: null, history: new Float64Array(0), steps: 0, energyError: 0,
  };
}
