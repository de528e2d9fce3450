// A whole run: cut into batches, run them (worker threads or here), stream ions and trajectories
// into the run folder in batch order, then write summary.json. Ctrl-C stops dispatching, keeps the
// batches finished so far and marks the summary incomplete.

import { availableParallelism } from 'node:os';
import type { Scene } from '../scene/types.js';
import { RunFolderWriter } from '../runfolder/writer.js';
import type { RunSummary, SpeciesSummary } from '../runfolder/summary.js';
import { TOOL_VERSION } from '../version.js';
import { finiteOrNull } from '../core/json.js';
import { planBatches } from './batches.js';
import { runBatches } from './pool.js';
import { Fate } from '../core/batch.js';
import { EnsembleHistory } from './history.js';
import type { BatchResult } from './track.js';
import { isElectrostatic } from './potential.js';
import { stageAt } from './start.js';
import { hasRf } from '../stages/registry.js';
import { fitCooling } from '../analysis/cooling.js';
import { isTimeOfFlight, tofSummary } from '../analysis/tof-summary.js';
import { scanSummary, scanTrap } from '../analysis/trap-scan.js';
import { SceneError } from '../scene/schema.js';
import { checkCoupledScene, runCoupled } from './run-coupled.js';

export interface RunOptions {
  out: string;
  force?: boolean;
  csv?: boolean;
  workers?: number;
  sceneFile?: string | null;
  commandLine?: string;
  /** Progress callback: ions done so far of total. */
  progress?: (done: number, total: number) => void;
  /** Install a SIGINT handler that finishes the folder as incomplete (the CLI does; tests don't). */
  handleSigint?: boolean;
}

/** Checks that need the resolved scene as a whole; warnings go to stderr and summary.json. */
export function sceneWarnings(scene: Scene): string[] {
  const w: string[] = [];
  const withRf = scene.stages.some(hasRf);
  if (withRf && scene.run.integrator === 'rk4' && scene.run.stepsPerCycle < 20) {
    w.push(`run.steps_per_cycle = ${scene.run.stepsPerCycle} is below 20: RK4 phase error grows; results may be inaccurate`);
  }
  if (scene.spaceCharge && scene.run.recordEvery > 0) w.push('space_charge: trajectories are not recorded in coupled runs; summary.json carries the cloud figures');
  return w;
}

export function checkIntegrator(scene: Scene): void {
  if (scene.run.integrator === 'dopri5' && (scene.gas || scene.stages.some((s) => s.gas))) {
    throw new SceneError('run.integrator: dopri5 does not combine with buffer gas (collisions need the fixed step); use rk4');
  }
}

export function checkStartsInside(scene: Scene): void {
  scene.ions.forEach((p, i) => {
    if (stageAt(scene, p.position.z) < 0) {
      const end = scene.stages[scene.stages.length - 1].zEnd;
      throw new SceneError(`ions.${i}.position.z: ${p.position.z * 1e3} mm lies outside every stage (0 to ${(end * 1e3).toPrecision(6)} mm)`);
    }
  });
}

export async function runScene(scene: Scene, opts: RunOptions): Promise<RunSummary> {
  checkStartsInside(scene);
  checkIntegrator(scene);
  if (scene.spaceCharge) checkCoupledScene(scene);
  const started = new Date();
  const t0 = performance.now();
  const plan = planBatches(scene);
  const workers = Math.max(1, opts.workers ?? availableParallelism());
  const warnings = sceneWarnings(scene);
  const writer = await RunFolderWriter.create(opts.out, { force: opts.force, csv: opts.csv });
  const hist = new EnsembleHistory(scene.run.historyEvery, scene.run.maxTime);
  const pops = scene.ions.map((p, k) => ({ population: k, mz: p.mz, charge: p.charge, total: 0, detected: 0, hit: 0, alive: 0, collisions: 0, aliveKe: 0 }));
  let steps = 0;
  let done = 0;
  let energyError = 0;
  let stop = false;
  // Arrival times of detected ions per population, for the time-of-flight figures.
  const tof = isTimeOfFlight(scene);
  const scan = scanTrap(scene) !== undefined;
  const arrivals: number[][] = scene.ions.map(() => []);
  const arrivalKe: number[][] = scene.ions.map(() => []);
  const onSigint = () => { stop = true; };
  if (opts.handleSigint) process.on('SIGINT', onSigint);
  let spaceCharge: Record<string, unknown> | undefined;
  const onResult = (r: BatchResult) => {
        writer.appendIons(r);
        if (r.trajectory && r.trajectory.length > 0) writer.appendTrajectory(splitPoints(r.trajectory));
        hist.merge(r.history);
        steps += r.steps;
        energyError = Math.max(energyError, r.energyError);
        for (let k = 0; k < r.count; k++) {
          const p = pops[r.population[k]];
          p.total++;
          p.collisions += r.collisions[k];
          if (r.fate[k] === Fate.detected) {
            p.detected++;
            if (tof || scan) { arrivals[r.population[k]].push(r.end_time[k]); arrivalKe[r.population[k]].push(r.end_ke_ev[k]); }
          }
          else if (r.fate[k] === Fate.hit) p.hit++;
          else { p.alive++; p.aliveKe += r.end_ke_ev[k]; }
        }
        done += r.count;
        opts.progress?.(done, plan.total);
  };
  try {
    if (scene.spaceCharge) {
      const c = await runCoupled(scene, workers);
      spaceCharge = c.figures;
      onResult(c.result);
    } else {
      await runBatches(scene, plan, { workers, stopped: () => stop, onResult });
    }
  } catch (e) {
    await writer.abort();
    throw e;
  } finally {
    if (opts.handleSigint) process.off('SIGINT', onSigint);
  }
  const complete = done === plan.total;
  if (!complete) warnings.push(`interrupted: ${done} of ${plan.total} ions finished; the tables hold those only`);
  if (isElectrostatic(scene) && energyError > 1e-6) {
    warnings.push(`energy drift ${energyError.toExponential(2)} (relative) in an electrostatic-only scene exceeds 1e-6`);
  }
  const histCols = hist.table();
  if (!scene.spaceCharge) writer.writeHistory(histCols);
  const species: SpeciesSummary[] = pops.map((p) => ({
    population: p.population, mz: p.mz, charge: p.charge, total: p.total, detected: p.detected, hit: p.hit, alive: p.alive,
    transmission: p.total > 0 ? p.detected / p.total : 0,
    // Mean kinetic energy of the ions still stored at max_time (RF heating shows here at high q).
    alive_mean_ke_ev: p.alive > 0 ? p.aliveKe / p.alive : null,
  }));
  const totals = species.reduce((a, s) => ({ total: a.total + s.total, detected: a.detected + s.detected, hit: a.hit + s.hit, alive: a.alive + s.alive }), { total: 0, detected: 0, hit: 0, alive: 0 });
  const summary: RunSummary = {
    complete,
    scene_name: scene.name,
    ions: totals,
    species,
    stats: { steps, wall_s: (performance.now() - t0) / 1000, ion_steps_per_s: steps / Math.max(1e-9, (performance.now() - t0) / 1000), max_energy_error: energyError },
    warnings,
    provenance: {
      tool_version: TOOL_VERSION,
      scene: sceneForJson(scene),
      scene_file: opts.sceneFile ?? null,
      seed: scene.seed,
      command_line: opts.commandLine ?? '',
      integrator: { method: scene.spaceCharge ? 'verlet (coupled ensemble)' : scene.run.integrator, tolerance: scene.run.integrator === 'dopri5' ? scene.run.tolerance : undefined, steps_per_cycle: scene.run.stepsPerCycle, step_without_rf_s: scene.run.stepNoRf, max_time_s: scene.run.maxTime, record_every: scene.run.recordEvery },
      workers,
      started_at: started.toISOString(),
      batch_size: plan.size,
    },
    units: { length: 'm', time: 's', velocity: 'm/s', energy: 'eV', voltage: 'V', frequency: 'Hz', pressure: 'Pa', mass: 'kg' },
  };
  if (scene.gas || scene.stages.some((s) => s.gas)) {
    const fit = fitCooling(histCols.t, histCols.mean_ke_ev);
    const lastK = histCols.t.length - 1;
    summary.cooling = {
      tau_s: fit.tau_s,
      final_mean_ke_ev: fit.final_mean_ke_ev,
      final_rms_radius_m: histCols.rms_radius_m[lastK],
      final_rms_z_m: histCols.rms_z_m[lastK],
      initial_mean_ke_ev: fit.initial_mean_ke_ev,
      plateau_mean_ke_ev: fit.plateau_mean_ke_ev,
      collisions_per_ion: totals.total > 0 ? pops.reduce((a, p) => a + p.collisions, 0) / totals.total : 0,
    };
    if (fit.tau_s === null && !scan) warnings.push('cooling: mean kinetic energy does not fall over the run; no time constant fitted');
  }
  if (spaceCharge) summary.space_charge = spaceCharge;
  if (tof) summary.tof = tofSummary(scene, arrivals, arrivalKe);
  if (scan) summary.scan = scanSummary(scene, arrivals);
  await writer.finish(summary);
  return summary;
}

/** Interleaved points (8 doubles each) → columns for trajectories.arrow. */
function splitPoints(d: Float64Array) {
  const n = d.length / 8;
  const ion = new Int32Array(n);
  const cols = [new Float64Array(n), new Float64Array(n), new Float64Array(n), new Float64Array(n), new Float64Array(n), new Float64Array(n), new Float64Array(n)];
  for (let k = 0, o = 0; k < n; k++, o += 8) {
    ion[k] = d[o];
    for (let c = 0; c < 7; c++) cols[c][k] = d[o + 1 + c];
  }
  return { ion, t: cols[0], x: cols[1], y: cols[2], z: cols[3], vx: cols[4], vy: cols[5], vz: cols[6] };
}

/** The resolved scene as JSON-safe data (Infinity → null). */
export function sceneForJson(scene: Scene): unknown {
  return JSON.parse(JSON.stringify(scene, finiteOrNull));
}
