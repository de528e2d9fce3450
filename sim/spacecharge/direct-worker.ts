// Worker side of ParallelDirect: wait for a new generation, sum the field of this thread's
// block of targets, count in, repeat until told to stop.
import { parentPort, workerData } from 'node:worker_threads';
import { fieldBlock } from './direct.js';
import { CTRL, views, blockOf, type SharedLayout } from './parallel.js';

const { layout, rank } = workerData as { layout: SharedLayout; rank: number };
const v = views(layout);
let seen = Atomics.load(v.ctrl, CTRL.gen);
parentPort!.postMessage('ready');
for (;;) {
  Atomics.wait(v.ctrl, CTRL.gen, seen);
  seen = Atomics.load(v.ctrl, CTRL.gen);
  if (Atomics.load(v.ctrl, CTRL.stop)) break;
  const n = Atomics.load(v.ctrl, CTRL.n);
  v.cloud.n = n;
  const [a, b] = blockOf(rank, Atomics.load(v.ctrl, CTRL.threads), n);
  fieldBlock(v.cloud, v.eps2[0], a, b, v.out);
  Atomics.add(v.ctrl, CTRL.done, 1);
  Atomics.notify(v.ctrl, CTRL.done);
}
parentPort!.close();
