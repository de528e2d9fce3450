// Worker thread: receives the scene once, then batch numbers; answers with each batch's result.

import { parentPort, workerData } from 'node:worker_threads';
import type { Scene } from '../scene/types.js';
import { trackBatch, type BatchResult } from './track.js';
import { gasFactory } from './gas-hooks.js';

const scene = (workerData as { scene: Scene }).scene;
const gas = gasFactory(scene);

parentPort!.on('message', (msg: { batch: number; start: number; count: number } | null) => {
  if (msg === null) { parentPort!.close(); return; }
  const r = trackBatch(scene, msg.batch, msg.start, msg.count, gas);
  parentPort!.postMessage(r, transferList(r));
});

export function transferList(r: BatchResult): ArrayBuffer[] {
  const out: ArrayBuffer[] = [];
  for (const v of Object.values(r)) {
    if (ArrayBuffer.isView(v)) out.push(v.buffer as ArrayBuffer);
  }
  return out;
}
