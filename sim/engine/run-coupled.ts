// Runs with space charge: the ions are coupled by their Coulomb field, so the whole ensemble
// advances together (sim/spacecharge: kick–drift–kick Verlet with a direct or Barnes–Hut field)
// instead of ion by ion. Supported for a scene of one RF trap stage; the figures are the trap
// designer's capacity numbers: RMS cloud size, secular frequencies of single-ion motion about the
// centroid (and their shift from the single-ion Mathieu value), ions lost.

import type { Scene, TrapStage } from '../scene/types.js';
import { isTrap } from '../stages/guards.js';
import { kindOf } from '../stages/registry.js';
import { SceneError } from '../scene/schema.js';
import { allocateBatch, Fate } from '../core/batch.js';
import { populationOffsets, startIon } from './start.js';
import { ensembleFromBatch, markLosses } from '../spacecharge/ensemble-step.js';
import { trapCloudFigures } from '../spacecharge/trap-cloud.js';
import { ParallelDirect } from '../spacecharge/parallel.js';
import { floquet } from '../mathieu/floquet.js';
import { mathieuParameters } from '../mathieu/parameters.js';
import { ELECTRONVOLT } from '../units/constants.js';
import { rfPhase, type BatchResult } from './track.js';

export interface CoupledResult {
  result: BatchResult;
  figures: Record<string, unknown>;
  steps: number;
}

export function checkCoupledScene(scene: Scene): TrapStage {
  const st = scene.stages[0];
  if (scene.stages.length !== 1 || !isTrap(st)) {
    throw new SceneError('space_charge: supported for a scene of a single trap stage in this version');
  }
  if (st.rf.ramp || st.aux) throw new SceneError('space_charge: a ramped RF or a supplementary AC is not supported with space charge yet');
  if (scene.gas || st.gas) throw new SceneError('space_charge: buffer gas together with space charge is not supported yet');
  if (scene.run.stepsPerCycle < 20) throw new SceneError(`run.steps_per_cycle: space-charge runs need at least 20, got ${scene.run.stepsPerCycle}`);
  return st;
}

export async function runCoupled(scene: Scene, workers: number): Promise<CoupledResult> {
  const st = checkCoupledScene(scene);
  const sc = scene.spaceCharge!;
  const total = scene.ions.reduce((a, p) => a + p.count, 0);
  const b = allocateBatch(total);
  const offsets = populationOffsets(scene);
  const res = emptyResult(total);
  const zc = 0.5 * (st.zStart + st.zEnd);
  let pop = 0;
  for (let i = 0; i < total; i++) {
    while (i >= offsets[pop + 1]) pop++;
    const tau = startIon(scene, b, i, i, pop, scene.ions[pop]);
    // Every ion starts inside the trap: it "enters" its RF stage at t = 0.
    res.entry_rf_phase[i] = rfPhase(st.rf.frequency, st.rf.phase, tau);
    res.ion[i] = i; res.population[i] = pop; res.mz[i] = scene.ions[pop].mz; res.charge[i] = scene.ions[pop].charge;
    res.x0[i] = b.x[i]; res.y0[i] = b.y[i]; res.z0[i] = b.z[i];
    res.vx0[i] = b.vx[i]; res.vy0[i] = b.vy[i]; res.vz0[i] = b.vz[i];
    b.z[i] -= zc; // the trap field of sim/spacecharge is centred on z = 0
  }
  // Search bands around the single-ion secular lines of the first population (Mathieu β).
  const p0 = scene.ions[0];
  const [qaZ, qaR] = mathieuParameters({ analyzer: 'trap', r0: st.r0, z0: st.z0, freq: st.rf.frequency, rf: st.rf.amplitude, dc: st.dc, mz: p0.mz, charge: p0.charge });
  const bz = floquet(qaZ.a, qaZ.q).beta;
  const br = floquet(qaR.a, qaR.q).beta;
  if (bz === null || br === null) throw new SceneError(`ions.0: m/z ${p0.mz} is not stable in the trap (q_z = ${qaZ.q.toFixed(3)}); space-charge figures need a stored species`);
  const fz = (bz * st.rf.frequency) / 2, fr = (br * st.rf.frequency) / 2;
  const solver = sc.method === 'direct' && workers > 1 ? await ParallelDirect.create(workers, total) : undefined;
  const e = ensembleFromBatch(b);
  e.lostAt = new Float64Array(total).fill(scene.run.maxTime);
  let fig;
  try {
    fig = trapCloudFigures(e, {
      field: kindOf(st).field(st), rfHz: st.rf.frequency,
      duration: scene.run.maxTime, stepsPerCycle: scene.run.stepsPerCycle,
      spaceCharge: { method: sc.method, weight: sc.weight, softening: sc.softening, theta: sc.theta, solver },
      bandZ: [0.3 * fz, 1.3 * fz], bandR: [0.1 * fr, 1.3 * fr],
    });
  } finally {
    await solver?.close();
  }
  markLosses(e, b, Fate.hit);
  for (let i = 0; i < total; i++) {
    b.z[i] += zc;
    res.fate[i] = b.fate[i];
    // The step at which the stepper found the ion outside the electrodes (max_time if it stayed).
    res.end_time[i] = e.lostAt[i];
    res.end_x[i] = b.x[i]; res.end_y[i] = b.y[i]; res.end_z[i] = b.z[i];
    res.end_vx[i] = b.vx[i]; res.end_vy[i] = b.vy[i]; res.end_vz[i] = b.vz[i];
    res.end_ke_ev[i] = (0.5 * b.mass[i] * (b.vx[i] ** 2 + b.vy[i] ** 2 + b.vz[i] ** 2)) / ELECTRONVOLT;
    res.end_stage[i] = 0;
  }
  res.steps = fig.history.steps * total;
  const figures = {
    method: sc.method,
    weight: sc.weight,
    simulated_ions: total,
    real_charges: total * sc.weight * Math.abs(p0.charge),
    softening_m: fig.softening,
    secular_frequency_z_hz: fig.secularZHz,
    secular_frequency_r_hz: fig.secularRHz,
    single_ion_secular_frequency_z_hz: fz,
    single_ion_secular_frequency_r_hz: fr,
    frequency_shift_z: fig.secularZHz / fz - 1,
    frequency_shift_r: fig.secularRHz / fr - 1,
    rms_z_m: fig.rmsZ,
    rms_radius_m: fig.rmsR,
    lost: fig.lost,
    note: 'secular lines from the spectrum of each ion about the centroid (Hann window); single-ion values from the Mathieu β of population 0',
  };
  return { result: res, figures, steps: res.steps };
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
