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
  // The main thread computes too: --workers N means N computing threads, N − 1 of them workers.
  // Each worker keeps two batches queued so it never waits for the main thread to feed it.
  // With one thread (or one batch) no worker starts and this thread runs every batch.
  const n = Math.max(0, Math.min(opts.workers, plan.count) - 1);
  const script = n > 0 ? workerScript() : '';
  const pending = new Map<number, BatchResult>();
  let next = 0;
  let emitted = 0;
  const emitReady = () => {
    while (pending.has(emitted)) {
      opts.onResult(pending.get(emitted)!);
      pending.delete(emitted);
      emitted++;
    }
  };
  let failure: unknown = null;
  const workers: { w: Worker; inflight: number; exited: Promise<void> }[] = [];
  const feed = (slot: { w: Worker; inflight: number }) => {
    while (slot.inflight < 2 && next < plan.count && !opts.stopped() && failure === null) {
      slot.w.postMessage(bounds(next++));
      slot.inflight++;
    }
  };
  for (let k = 0; k < n; k++) {
    const w = new Worker(script, { workerData: { scene } });
    const slot = { w, inflight: 0, exited: new Promise<void>((r) => w.once('exit', () => r())) };
    workers.push(slot);
    w.on('message', (r: BatchResult) => {
      slot.inflight--;
      pending.set(r.batch, r);
      try { emitReady(); } catch (e) { failure ??= e; }
      feed(slot);
    });
    w.on('error', (e) => { failure ??= e; });
    feed(slot);
  }
  const gas = gasFactory(scene);
  while (failure === null && !opts.stopped() && next < plan.count) {
    const { batch, start, count } = bounds(next++);
    pending.set(batch, trackBatch(scene, batch, start, count, gas));
    emitReady();
    // Let worker results and a pending SIGINT in.
    await new Promise((r) => setImmediate(r));
  }
  // Wait for the batches still queued on workers, then stop them.
  while (failure === null && workers.some((s) => s.inflight > 0)) await new Promise((r) => setTimeout(r, 2));
  for (const s of workers) s.w.postMessage(null);
  await Promise.all(workers.map((s) => s.exited));
  if (failure !== null) throw failure;
  return emitted;
}
