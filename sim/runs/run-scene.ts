// A whole run: cut into batches, run them (worker threads or here), stream ions and trajectories
// into the run folder in batch order, then write summary.json. Ctrl-C stops dispatching, keeps the
// batches finished so far and marks the summary incomplete; SIGTERM does the same (stop-signals.ts).
// Before anything is written the run's cost is estimated (estimate.ts) and a run whose output
// would exceed the limit is refused.

import { availableParallelism } from 'node:os';
import type { Scene } from '../scene/types.js';
import { RunFolderWriter } from '../runfolder/writer.js';
import type { RunSummary, SpeciesSummary } from '../runfolder/summary.js';
import { TOOL_VERSION } from '../version.js';
import { finiteOrNull } from '../core/json.js';
import { planBatches } from '../engine/batches.js';
import { runBatches } from '../engine/pool.js';
import { EnsembleHistory } from '../engine/history.js';
import type { BatchResult } from '../engine/track.js';
import { isElectrostatic } from '../engine/potential.js';
import { ArrivalTally, figureBlocks, needsArrivals, SpeciesTally, StepTally, type BatchReducer } from './reducers.js';
import { prepareCoupled, runCoupled } from '../engine/run-coupled.js';
import { detectorOf } from '../scene/detector.js';
import { checkIntegrator, checkStartsInside, sceneWarnings } from '../engine/checks.js';
import { checkOutputLimit, estimateRun, type RunEstimate } from './estimate.js';
import { onStopSignal } from './stop-signals.js';
export { checkIntegrator, checkStartsInside, sceneWarnings };

export interface RunOptions {
  out: string;
  force?: boolean;
  csv?: boolean;
  workers?: number;
  sceneFile?: string | null;
  commandLine?: string;
  /** Progress callback: ions done so far of total. */
  progress?: (done: number, total: number) => void;
  /** Install SIGINT and SIGTERM handlers that finish the folder as incomplete (the CLI does; tests don't). */
  handleSigint?: boolean;
  /** Largest estimated output allowed, bytes (default DEFAULT_MAX_OUTPUT, 5 GB). */
  maxOutput?: number;
  /** Told the run's estimate once the run folder is started, before the first batch (the CLI prints it). */
  onEstimate?: (e: RunEstimate, workers: number) => void;
}

export async function runScene(scene: Scene, opts: RunOptions): Promise<RunSummary> {
  checkStartsInside(scene);
  checkIntegrator(scene);
  // A coupled run draws its ions and chooses its step first: its checks need the cloud.
  const coupled = scene.spaceCharge ? prepareCoupled(scene) : null;
  const started = new Date();
  const t0 = performance.now();
  const plan = planBatches(scene);
  const workers = Math.max(1, opts.workers ?? availableParallelism());
  const warnings = sceneWarnings(scene);
  const estimate = estimateRun(scene, { csv: opts.csv, coupledSteps: coupled?.step.steps });
  checkOutputLimit(estimate, opts.maxOutput);
  const writer = await RunFolderWriter.create(opts.out, { force: opts.force, csv: opts.csv });
  opts.onEstimate?.(estimate, workers);
  const hist = new EnsembleHistory(scene.run.historyEvery, scene.run.maxTime, scene.ions.length);
  // The summaries, as reducers fed every batch result in batch order (reducers.ts).
  const tally = new SpeciesTally(scene);
  const stepTally = new StepTally();
  const arrivals = needsArrivals(scene) ? new ArrivalTally(scene) : null;
  const reducers: BatchReducer[] = arrivals ? [tally, stepTally, arrivals] : [tally, stepTally];
  let done = 0;
  let stop = false;
  let stoppedBy = 'a stop request';
  const offSignals = opts.handleSigint ? onStopSignal((sig) => { stop = true; stoppedBy = sig; }) : null;
  let spaceCharge: Record<string, unknown> | undefined;
  let stoppedAt: number | undefined;
  const onResult = (r: BatchResult) => {
        writer.appendIons(r);
        if (r.trajectory && r.trajectory.length > 0) writer.appendTrajectory(splitPoints(r.trajectory));
        hist.merge(r.history);
        for (const red of reducers) red.add(r);
        done += r.count;
        opts.progress?.(done, plan.total);
  };
  try {
    if (coupled) {
      const c = await runCoupled(scene, coupled, { workers, stopped: () => stop, progress: opts.progress });
      spaceCharge = c.figures;
      stoppedAt = c.stoppedAt;
      warnings.push(...c.warnings);
      onResult(c.result);
    } else {
      await runBatches(scene, plan, { workers, stopped: () => stop, onResult });
    }
  } catch (e) {
    offSignals?.();
    await writer.abort();
    throw e;
  }
  const complete = done === plan.total && stoppedAt === undefined;
  if (stoppedAt !== undefined) {
    warnings.push(`interrupted (${stoppedBy}): the coupled run stopped at t = ${Number((stoppedAt * 1e6).toPrecision(4))} µs of max_time ${Number((scene.run.maxTime * 1e6).toPrecision(4))} µs; ions still in flight are kept as alive at that time`);
  } else if (!complete) warnings.push(`interrupted (${stoppedBy}): ${done} of ${plan.total} ions finished; the tables hold those only`);
  const { steps, energyError } = stepTally;
  if (isElectrostatic(scene) && energyError > 1e-6) {
    warnings.push(`energy drift ${energyError.toExponential(2)} (relative) in an electrostatic-only scene exceeds 1e-6`);
  }
  const histCols = hist.table();
  const speciesCols = hist.speciesTable();
  writer.writeHistory(histCols);
  if (speciesCols) writer.writeSpeciesHistory(speciesCols);
  const species: SpeciesSummary[] = tally.species();
  const totals = species.reduce((a, s) => ({
    total: a.total + s.total, detected: a.detected + s.detected, hit: a.hit + s.hit,
    missed: a.missed + (s.missed ?? 0), returned: a.returned + (s.returned ?? 0), alive: a.alive + s.alive,
  }), { total: 0, detected: 0, hit: 0, missed: 0, returned: 0, alive: 0 });
  const det = detectorOf(scene);
  const summary: RunSummary = {
    complete,
    scene_name: scene.name,
    ions: totals,
    detector: { radius_m: Number.isFinite(det.radius) ? det.radius : null, source: det.source },
    species,
    stats: { steps, wall_s: (performance.now() - t0) / 1000, ion_steps_per_s: steps / Math.max(1e-9, (performance.now() - t0) / 1000), max_energy_error: energyError },
    warnings,
    provenance: {
      tool_version: TOOL_VERSION,
      scene: sceneForJson(scene),
      scene_file: opts.sceneFile ?? null,
      seed: scene.seed,
      command_line: opts.commandLine ?? '',
      // Only the settings that apply: a tolerance exists for the adaptive method alone.
      integrator: coupled
        ? { method: 'verlet (coupled ensemble)', step_s: coupled.step.h, steps: coupled.step.steps, step_chosen_from: coupled.step.from, steps_per_cycle: scene.run.stepsPerCycle, max_time_s: scene.run.maxTime, record_every: scene.run.recordEvery }
        : { method: scene.run.integrator, ...(scene.run.integrator === 'dopri5' ? { tolerance: scene.run.tolerance } : {}), steps_per_cycle: scene.run.stepsPerCycle, step_without_rf_s: scene.run.stepNoRf, max_time_s: scene.run.maxTime, record_every: scene.run.recordEvery },
      workers,
      started_at: started.toISOString(),
      batch_size: plan.size,
      estimate,
    },
    units: { length: 'm', time: 's', velocity: 'm/s', energy: 'eV', voltage: 'V', frequency: 'Hz', pressure: 'Pa', mass: 'kg' },
  };
  const blocks = figureBlocks(scene, histCols, tally, arrivals, totals.total, warnings, speciesCols);
  if (blocks.cooling) summary.cooling = blocks.cooling;
  if (spaceCharge) summary.space_charge = spaceCharge;
  if (blocks.tof) summary.tof = blocks.tof;
  if (blocks.scan) summary.scan = blocks.scan;
  try {
    // A signal from here on waits for the folder to be in place (it has nothing left to stop).
    await writer.finish(summary);
  } finally {
    offSignals?.();
  }
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
