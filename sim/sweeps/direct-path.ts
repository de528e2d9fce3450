// Direct integration of sweep points: the engine's own trackBatch (RK4 kernels, gas, everything),
// without a run folder. Batches follow planBatches so the ions are the engine's; a persistent pool
// of worker threads serves every point of a sweep (workers start once, not once per point).

import type { Scene } from '../scene/types.js';
import { trackBatch } from '../engine/track.js';
import { gasFactory } from '../engine/gas-hooks.js';
import { Fate } from '../core/batch.js';
import { planBatches } from '../engine/batches.js';
import { Executor, workerScript } from '../core/executor.js';

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

/** The message of one batch of a point (sweep-worker.ts). */
export interface PointBatch { scene: Scene; start: number; count: number }

/**
 * Runs points' batches on `threads` worker threads (or in this thread for one); this thread only
 * hands out batches and sums. The workers start with the first point that needs them.
 */
export class DirectPool {
  private exec: Executor<PointBatch, number> | null = null;

  constructor(readonly threads: number) {}

  /** Detected ions of one point (all its ions, or from..to−1 only, in engine-sized batches). */
  async count(scene: Scene, from = 0, to?: number): Promise<number> {
    const plan = planBatches(scene);
    const end = to ?? plan.total;
    const count = Math.ceil((end - from) / plan.size);
    const local = this.threads <= 1 || count <= 1;
    if (!local) this.exec ??= new Executor({ workers: this.threads, script: workerScript(new URL('./sweep-worker.js', import.meta.url)) });
    let d = 0;
    await (local ? new Executor<PointBatch, number>({ workers: 0 }) : this.exec!).runOrdered({
      count,
      task: (b) => {
        const start = from + b * plan.size;
        return { scene, start, count: Math.min(plan.size, end - start) };
      },
      here: local ? (t) => directCounts(t.scene, t.start, t.count) : undefined,
      onResult: (r) => { d += r; },
    });
    return d;
  }

  async close(): Promise<void> {
    await this.exec?.close();
    this.exec = null;
  }
}
