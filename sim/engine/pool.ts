// Runs batches on worker threads (or in this thread for one worker) and hands results back in
// batch order, whatever order they finish in.

import { Worker } from 'node:worker_threads';
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import type { Scene } from '../scene/types.js';
import type { BatchPlan } from './batches.js';
import { trackBatch, type BatchResult } from './track.js';
import { gasFactory } from './gas-hooks.js';

export interface PoolOptions {
  workers: number;
  /** Called with each result in batch order. */
  onResult: (r: BatchResult) => void;
  /** Polled between batches: true stops dispatching (Ctrl-C). */
  stopped: () => boolean;
}

/** The compiled worker script (tests run from the TypeScript sources; `npm test` builds dist/ first). */
function workerScript(): string {
  const here = fileURLToPath(import.meta.url);
  if (here.endsWith('.js')) return here.replace(/pool\.js$/, 'worker.js');
  const dist = here.replace(/\/sim\/engine\/pool\.ts$/, '/dist/sim/engine/worker.js');
  if (!existsSync(dist)) throw new Error(`worker script ${dist} missing: run 'npm run build' first`);
  return dist;
}

/** Run every batch; resolves to the number of batches completed (in order, from the first). */
export async function runBatches(scene: Scene, plan: BatchPlan, opts: PoolOptions): Promise<number> {
  const bounds = (b: number) => {
    const start = b * plan.size;
    return { batch: b, start, count: Math.min(plan.size, plan.total - start) };
  };
  if (opts.workers <= 1 || plan.count <= 1) {
    const gas = gasFactory(scene);
    let b = 0;
    for (; b < plan.count; b++) {
      if (opts.stopped()) break;
      const { start, count } = bounds(b);
      opts.onResult(trackBatch(scene, b, start, count, gas));
      // Let a pending SIGINT be delivered between batches.
      if ((b & 3) === 3) await new Promise((r) => setImmediate(r));
    }
    return b;
  }

  const n = Math.min(opts.workers, plan.count);
  const script = workerScript();
  const pending = new Map<number, BatchResult>();
  let next = 0;
  let emitted = 0;
  const workers: Worker[] = [];
  await new Promise<void>((resolve, reject) => {
    let live = n;
    const feed = (w: Worker) => {
      if (next < plan.count && !opts.stopped()) w.postMessage(bounds(next++));
      else { w.postMessage(null); }
    };
    for (let k = 0; k < n; k++) {
      const w = new Worker(script, { workerData: { scene } });
      workers.push(w);
      w.on('message', (r: BatchResult) => {
        pending.set(r.batch, r);
        while (pending.has(emitted)) {
          opts.onResult(pending.get(emitted)!);
          pending.delete(emitted);
          emitted++;
        }
        feed(w);
      });
      w.on('error', (e) => { for (const o of workers) void o.terminate(); reject(e); });
      w.on('exit', () => { if (--live === 0) resolve(); });
      feed(w);
    }
  });
  return emitted;
}
