// Worker side of ParallelTree: wait for a new generation, build the tree and take leaves until
// none are left, report done, repeat until told to stop.
import { parentPort, workerData } from 'node:worker_threads';
import { announceReady } from '../core/executor.js';
import { CoulombTree } from './tree.js';
import { TREE_CTRL, shareLeaves, type TreeLayout } from './parallel-tree.js';
import { views } from './parallel.js';

const { layout } = workerData as { layout: TreeLayout };
const v = views(layout);
const tree = new CoulombTree({ theta: layout.theta });
let seen = Atomics.load(v.ctrl, TREE_CTRL.gen);
announceReady();
for (;;) {
  Atomics.wait(v.ctrl, TREE_CTRL.gen, seen);
  seen = Atomics.load(v.ctrl, TREE_CTRL.gen);
  if (Atomics.load(v.ctrl, TREE_CTRL.stop)) break;
  shareLeaves(v, tree);
  Atomics.add(v.ctrl, TREE_CTRL.done, 1);
  Atomics.notify(v.ctrl, TREE_CTRL.done);
}
parentPort!.close();
