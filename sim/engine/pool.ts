// Runs batches on worker threads (or in this thread for one worker) and hands results back in
// batch order, whatever order they finish in.

import type { Scene } from '../scene/types.js';
import type { BatchPlan } from './batches.js';
import { trackBatch, type BatchResult } from './track.js';
import { gasFactory } from './gas-hooks.js';
import { Executor, workerScript } from '../core/executor.js';

export interface PoolOptions {
  workers: number;
  /** Called with each result in batch order. */
  onResult: (r: BatchResult) => void;
  /** Polled between batches: true stops dispatching (Ctrl-C). */
  stopped: () => boolean;
  /**
   * Keep this thread free of batches (every computing thread is a worker) and drop the batches in
   * flight on a stop, so Ctrl-C is answered at once instead of after the longest batch; for runs
   * whose batches take seconds. The results are the same either way.
   */
  responsive?: boolean;
  /** Only batches first..end−1 (a shard's slice; default all). */
  first?: number;
  end?: number;
}

/** The message of one batch (worker.ts). */
export interface BatchTask { batch: number; start: number; count: number }

/** Run every batch; resolves to the number of batches completed (in order, from the first). */
export async function runBatches(scene: Scene, plan: BatchPlan, opts: PoolOptions): Promise<number> {
  // The main thread computes too: --workers N means N computing threads, N − 1 of them workers.
  // Each worker keeps two batches queued so it never waits for the main thread to feed it.
  // With one thread (or one batch) no worker starts and this thread runs every batch.
  const first = opts.first ?? 0, count = (opts.end ?? plan.count) - first;
  const responsive = opts.responsive === true && count > 0;
  const n = Math.max(0, Math.min(opts.workers, count) - (responsive ? 0 : 1));
  const exec = new Executor<BatchTask, BatchResult>({
    workers: n, script: n > 0 ? workerScript(new URL('./worker.js', import.meta.url)) : undefined,
    workerData: () => ({ scene }), inflight: 2,
  });
  const gas = gasFactory(scene);
  try {
    return await exec.runOrdered({
      count,
      task: (k) => {
        const b = first + k, start = b * plan.size;
        return { batch: b, start, count: Math.min(plan.size, plan.total - start) };
      },
      here: responsive ? undefined : ({ batch, start, count }) => trackBatch(scene, batch, start, count, gas),
      onResult: (r) => opts.onResult(r),
      stopped: opts.stopped,
      abandon: responsive,
    });
  } finally {
    await exec.close();
  }
}
