// A whole run: cut into batches, run them (worker threads or here), stream ions and trajectories
// into the run folder in batch order, then write summary.json. Ctrl-C stops dispatching, keeps the
// batches finished so far and marks the summary incomplete; SIGTERM does the same (stop-signals.ts).
// Before anything is written the run's cost is estimated (estimate.ts) and a run whose output
// would exceed the limit is refused.

import { availableParallelism } from 'node:os';
import type { Scene } from '../scene/types.js';
import { RunFolderWriter } from '../runfolder/writer.js';
import type { RunSummary } from '../runfolder/summary.js';
import type { ColumnSpec } from '../runfolder/columns.js';
import { TOOL_VERSION } from '../version.js';
import { planBatches } from '../engine/batches.js';
import { runBatches } from '../engine/pool.js';
import type { BatchResult } from '../engine/track.js';
import { prepareCoupled, runCoupled } from '../engine/run-coupled.js';
import { checkIntegrator, checkStartsInside, sceneWarnings } from '../engine/checks.js';
import { checkOutputLimit, estimateRun, type RunEstimate } from './estimate.js';
import { onStopSignal } from './stop-signals.js';
import { runSummary, runTallies, sceneForJson } from './run-summary.js';
import { HISTORY_BATCHES_FILE, SHARD_FILE, SHARD_FORMAT, ShardError, sceneHash, sliceRange, type SceneSource, type ShardSpec } from './shard.js';
export { checkIntegrator, checkStartsInside, sceneWarnings, sceneForJson };

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
  /** Run only shard I of N (a slice of the batches) into a part folder for `iontrail merge`. */
  shard?: { spec: ShardSpec; source: SceneSource };
}

/** A run part's per-batch history sums (history_batches.arrow). */
/** Estimated seconds per batch above which an interactive run keeps its main thread free (pool.ts). */
const RESPONSIVE_BATCH_S = 1;

export const HISTORY_BATCH_COLUMNS: readonly ColumnSpec[] = [{ name: 'batch', kind: 'int32' }, { name: 'sum', kind: 'float64' }];

export async function runScene(scene: Scene, opts: RunOptions): Promise<RunSummary> {
  checkStartsInside(scene);
  checkIntegrator(scene);
  // A coupled run draws its ions and chooses its step first: its checks need the cloud.
  const coupled = scene.spaceCharge ? prepareCoupled(scene) : null;
  const started = new Date();
  const t0 = performance.now();
  const plan = planBatches(scene);
  let batches: [number, number] = [0, plan.count];
  if (opts.shard) {
    if (scene.spaceCharge) throw new ShardError('--shard: space charge couples every ion of the run, so it cannot be cut into shards');
    batches = sliceRange(opts.shard.spec, plan.count, `the run has ${plan.count} batches of ${plan.size} ions and a shard holds whole batches`);
  }
  const ions: [number, number] = [batches[0] * plan.size, Math.min(plan.total, batches[1] * plan.size)];
  const total = ions[1] - ions[0];
  const workers = Math.max(1, opts.workers ?? availableParallelism());
  const warnings = sceneWarnings(scene);
  const estimate = estimateRun(scene, { csv: opts.csv, coupledSteps: coupled?.step.steps });
  // The summaries, as reducers fed every batch result in batch order (reducers.ts).
  const t = runTallies(scene);
  // A part writes its slice only, and each of its batches' history sums (history_batches.arrow).
  const partBytes = () => Math.round(estimate.output_bytes * (total / Math.max(1, plan.total))) + (batches[1] - batches[0]) * t.hist.sums.length * 12;
  checkOutputLimit(opts.shard ? { ...estimate, output_bytes: partBytes() } : estimate, opts.maxOutput);
  const writer = await RunFolderWriter.create(opts.out, { force: opts.force, csv: opts.csv });
  opts.onEstimate?.(estimate, workers);
  // A part keeps each batch's history sums: the merge adds them in batch order, as a run does.
  const historyBatches = opts.shard ? writer.extraTable(HISTORY_BATCHES_FILE, HISTORY_BATCH_COLUMNS, 'history batches') : null;
  let done = 0;
  let stop = false;
  let stoppedBy = 'a stop request';
  const offSignals = opts.handleSigint ? onStopSignal((sig) => { stop = true; stoppedBy = sig; }) : null;
  let spaceCharge: Record<string, unknown> | undefined;
  let stoppedAt: number | undefined;
  const onResult = (r: BatchResult) => {
        writer.appendIons(r);
        if (r.trajectory && r.trajectory.length > 0) writer.appendTrajectory(splitPoints(r.trajectory));
        t.hist.merge(r.history);
        if (historyBatches && r.history.length > 0) historyBatches.append({ batch: new Int32Array(r.history.length).fill(r.batch), sum: r.history });
        for (const red of t.reducers) red.add(r);
        done += r.count;
        opts.progress?.(done, total);
  };
  try {
    if (coupled) {
      const c = await runCoupled(scene, coupled, { workers, stopped: () => stop, progress: opts.progress });
      spaceCharge = c.figures;
      stoppedAt = c.stoppedAt;
      warnings.push(...c.warnings);
      onResult(c.result);
    } else {
      // A stop is answered at once when batches are long; short ones keep this thread computing.
      const responsive = opts.handleSigint === true && estimate.cpu_time_s / plan.count > RESPONSIVE_BATCH_S;
      await runBatches(scene, plan, { workers, stopped: () => stop, onResult, first: batches[0], end: batches[1], responsive });
    }
  } catch (e) {
    offSignals?.();
    await writer.abort();
    throw e;
  }
  const { summary, histCols, speciesCols } = runSummary(scene, t, {
    done, total, stoppedBy, warnings, workers, started, wallS: (performance.now() - t0) / 1000, estimate,
    batchSize: plan.size, sceneFile: opts.sceneFile ?? null, commandLine: opts.commandLine ?? '', spaceCharge, stoppedAt, coupledStep: coupled?.step,
  });
  writer.writeHistory(histCols);
  if (speciesCols) writer.writeSpeciesHistory(speciesCols);
  if (opts.shard) {
    const shard = { index: opts.shard.spec.index, count: opts.shard.spec.count, batches, ions };
    summary.provenance.shard = shard;
    writer.extraFile(SHARD_FILE, JSON.stringify({
      format: SHARD_FORMAT, kind: 'run', tool_version: TOOL_VERSION, scene_sha256: sceneHash(scene), seed: scene.seed,
      shard: opts.shard.spec, units: { total: plan.count, from: batches[0], to: batches[1], unit: 'batches' }, ions,
      complete: summary.complete, wall_s: summary.stats.wall_s, workers, started_at: started.toISOString(),
      steps: t.stepTally.steps, energy_error: t.stepTally.energyError, csv: opts.csv ?? false, source: opts.shard.source,
    }, null, 2) + '\n');
  }
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
