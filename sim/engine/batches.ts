// How a run is cut into batches. The size depends on the scene only (never on the worker count),
// so per-batch sums and the order of output rows are the same on any machine.

import type { Scene } from '../scene/types.js';
import { firstRf } from '../stages/registry.js';

export interface BatchPlan {
  size: number;
  count: number;
  total: number;
}

export function planBatches(scene: Scene): BatchPlan {
  const total = scene.ions.reduce((a, p) => a + p.count, 0);
  // At least ~32 batches when the run allows it, so two or more workers share the load evenly.
  let size = Math.min(256, Math.max(8, Math.ceil(total / 32)));
  if (scene.run.recordEvery > 0) {
    // Keep one batch's recorded points to about 2 million (128 MB) so output streams.
    const rf = firstRf(scene.stages);
    const h = rf ? 1 / rf.rf.frequency / scene.run.stepsPerCycle : scene.run.stepNoRf;
    const perIon = scene.run.maxTime / h / scene.run.recordEvery + 2 * scene.stages.length + 2;
    size = Math.max(1, Math.min(256, Math.floor(2e6 / perIon)));
  }
  return { size, count: Math.ceil(total / size), total };
}
