// Worker side of ParallelDirect: wait for a new generation, run this thread's share of the
// wavefront, repeat until told to stop.
import { parentPort, workerData } from 'node:worker_threads';
import { announceReady } from '../core/executor.js';
import { CTRL, views, wavefront, type SharedLayout } from './parallel.js';

const { layout, rank } = workerData as { layout: SharedLayout; rank: number };
const v = views(layout);
let seen = Atomics.load(v.ctrl, CTRL.gen);
announceReady();
for (;;) {
  Atomics.wait(v.ctrl, CTRL.gen, seen);
  seen = Atomics.load(v.ctrl, CTRL.gen);
  if (Atomics.load(v.ctrl, CTRL.stop)) break;
  wavefront(v, rank);
}
parentPort!.close();
