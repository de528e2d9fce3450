// Worker thread: receives the scene once, then batch numbers; answers with each batch's result.

import { workerData } from 'node:worker_threads';
import type { Scene } from '../scene/types.js';
import { trackBatch, type BatchResult } from './track.js';
import { gasFactory } from './gas-hooks.js';
import { serveTasks } from '../core/executor.js';
import type { BatchTask } from './pool.js';

const scene = (workerData as { scene: Scene }).scene;
const gas = gasFactory(scene);

serveTasks((t: BatchTask) => trackBatch(scene, t.batch, t.start, t.count, gas), transferList);

export function transferList(r: BatchResult): ArrayBuffer[] {
  const out: ArrayBuffer[] = [];
  for (const v of Object.values(r)) {
    if (ArrayBuffer.isView(v)) out.push(v.buffer as ArrayBuffer);
  }
  return out;
}
