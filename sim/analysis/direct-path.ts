// Direct integration of sweep points: the engine's own trackBatch (RK4 kernels, gas, everything),
// without a run folder. Batches follow planBatches so the ions are the engine's; a persistent pool
// of worker threads serves every point of a sweep (workers start once, not once per point).

import { Worker } from 'node:worker_threads';
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import type { Scene } from '../scene/types.js';
import { trackBatch } from '../engine/track.js';
import { gasFactory } from '../engine/gas-hooks.js';
import { Fate } from '../core/batch.js';
import { planBatches } from '../engine/batches.js';

/** The scene as a sweep point runs it: no trajectories, no ensemble history (fates only). */
export function sweepRunSettings(scene: Scene): Scene {
  return { ...scene, run: { ...scene.run, recordEvery: 0, historyEvery: 2 * scene.run.maxTime } };
}

/** Detected ions among start..start+count−1 by direct integration. */
export function directCounts(scene: Scene, start: number, count: number): number {
  const r = trackBatch(scene, 0, start, count, gasFactory(scene));
  let d = 0;
  for (let i = 0; i < count; i++) if (r.fate[i] === Fate.detected) d++;
  return d;
}

function workerScript(): string {
  const here = fileURLToPath(import.meta.url);
  if (here.endsWith('.js')) return here.replace(/direct-path\.js$/, 'sweep-worker.js');
  const dist = here.replace(/\/sim\/analysis\/direct-path\.ts$/, '/dist/sim/analysis/sweep-worker.js');
  if (!existsSync(dist)) throw new Error(`worker script ${dist} missing: run 'npm run build' first`);
  return dist;
}

/** Runs points' batches on `workers` threads (or in this thread for one). */
export class DirectPool {
  private workers: Worker[] = [];
  private idle: Worker[] = [];
  private queue: { id: number; scene: Scene; start: number; count: number; done: (d: number) => void; fail: (e: unknown) => void }[] = [];
  private waiting = new Map<number, { done: (d: number) => void; fail: (e: unknown) => void }>();
  private nextId = 0;

  constructor(readonly threads: number) {}

  /** Detected ions of one point (all its ions, in engine batches). */
  async count(scene: Scene): Promise<number> {
    const plan = planBatches(scene);
    if (this.threads <= 1 || plan.count <= 1) {
      let d = 0;
      for (let b = 0; b < plan.count; b++) {
        const start = b * plan.size;
        d += directCounts(scene, start, Math.min(plan.size, plan.total - start));
        if ((b & 7) === 7) await new Promise((r) => setImmediate(r));
      }
      return d;
    }
    const parts: Promise<number>[] = [];
    for (let b = 0; b < plan.count; b++) {
      const start = b * plan.size;
      parts.push(this.submit(scene, start, Math.min(plan.size, plan.total - start)));
    }
    return (await Promise.all(parts)).reduce((a, v) => a + v, 0);
  }

  private submit(scene: Scene, start: number, count: number): Promise<number> {
    return new Promise((done, fail) => {
      this.queue.push({ id: this.nextId++, scene, start, count, done, fail });
      this.pump();
    });
  }

  private pump(): void {
    while (this.queue.length > 0) {
      let w = this.idle.pop();
      if (!w && this.workers.length < this.threads) w = this.spawn();
      if (!w) return;
      const t = this.queue.shift()!;
      this.waiting.set(t.id, { done: t.done, fail: t.fail });
      w.postMessage({ id: t.id, scene: t.scene, start: t.start, count: t.count });
    }
  }

  private spawn(): Worker {
    const w = new Worker(workerScript());
    this.workers.push(w);
    w.on('message', (m: { id: number; detected: number }) => {
      const cb = this.waiting.get(m.id);
      this.waiting.delete(m.id);
      this.idle.push(w);
      cb?.done(m.detected);
      this.pump();
    });
    w.on('error', (e) => {
      for (const cb of this.waiting.values()) cb.fail(e);
      this.waiting.clear();
      for (const t of this.queue) t.fail(e);
      this.queue = [];
    });
    return w;
  }

  async close(): Promise<void> {
    await Promise.all(this.workers.map((w) => w.terminate()));
    this.workers = [];
    this.idle = [];
  }
}
