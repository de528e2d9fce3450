// Barnes–Hut field split over threads: this thread and (threads − 1) worker_threads share the
// positions, charges and field through SharedArrayBuffers laid out as ParallelDirect's
// (parallel.ts views), so a step stays synchronous.
//
// Every thread builds the same tree from the shared positions (the build is a function of the
// positions only and costs ~2 % of an evaluation, less than shipping the tree's arrays), then
// takes chunks of leaves from a shared counter until none are left. A target's sum is made by
// whichever thread owns its leaf, from lists that depend on the positions only (tree.ts), so the
// field has the same bits for any thread count, including the serial CoulombTree.

import { CoulombTree } from './tree.js';
import type { ChargeCloud, FieldOut } from './direct.js';
import type { FieldSolver } from './ensemble-step.js';
import { Executor, workerScript } from '../core/executor.js';
import { views, type SharedLayout } from './parallel.js';

/** Control words in the shared Int32Array. */
export const TREE_CTRL = { gen: 0, n: 1, stop: 2, threads: 3, next: 4, done: 5 } as const;

export interface TreeLayout extends SharedLayout {
  theta: number;
}

/** This thread's share: build the tree, then evaluate chunks of leaves until the counter runs out. */
export function shareLeaves(v: ReturnType<typeof views>, tree: CoulombTree): void {
  v.cloud.n = Atomics.load(v.ctrl, TREE_CTRL.n);
  tree.build(v.cloud);
  const eps2 = v.eps2[0], chunks = tree.chunks;
  for (let c = Atomics.add(v.ctrl, TREE_CTRL.next, 1); c < chunks; c = Atomics.add(v.ctrl, TREE_CTRL.next, 1)) {
    tree.fieldChunk(eps2, c, v.out);
  }
}

export class ParallelTree implements FieldSolver {
  private readonly v: ReturnType<typeof views>;
  private readonly tree: CoulombTree;
  private gen = 0;

  private constructor(private readonly layout: TreeLayout, private readonly exec: Executor<never, never>, readonly threads: number) {
    this.v = views(layout);
    this.tree = new CoulombTree({ theta: layout.theta });
  }

  /** Starts (threads − 1) workers for clouds of up to `capacity` ions. Call close() when done. */
  static async create(threads: number, capacity: number, theta = 0.5): Promise<ParallelTree> {
    const P = Math.max(1, Math.floor(threads));
    const layout: TreeLayout = {
      ctrl: new SharedArrayBuffer(4 * 8), data: new SharedArrayBuffer(8 * (7 * capacity + 1)), capacity, theta,
    };
    new Int32Array(layout.ctrl)[TREE_CTRL.threads] = P;
    // As for ParallelDirect: work comes through the control words, and a forgotten close() must
    // not keep the process alive.
    const exec = new Executor<never, never>({
      workers: P - 1, script: P > 1 ? workerScript(new URL('./tree-worker.js', import.meta.url)) : undefined,
      workerData: () => ({ layout }), unref: true,
    });
    await exec.ready();
    return new ParallelTree(layout, exec, P);
  }

  field(c: ChargeCloud, softening: number, out: FieldOut): void {
    const n = c.n, v = this.v, ctrl = v.ctrl, helpers = this.threads - 1;
    if (n > this.layout.capacity) throw new RangeError(`parallel tree sized for ${this.layout.capacity} ions, got ${n}`);
    v.cloud.x.set(c.x.subarray(0, n)); v.cloud.y.set(c.y.subarray(0, n)); v.cloud.z.set(c.z.subarray(0, n));
    v.cloud.qs.set(c.qs.subarray(0, n));
    v.eps2[0] = softening * softening; // as CoulombTree.fieldRange squares it: the same bits
    Atomics.store(ctrl, TREE_CTRL.n, n);
    Atomics.store(ctrl, TREE_CTRL.next, 0);
    Atomics.store(ctrl, TREE_CTRL.done, 0);
    this.gen++;
    Atomics.store(ctrl, TREE_CTRL.gen, this.gen);
    Atomics.notify(ctrl, TREE_CTRL.gen);
    shareLeaves(v, this.tree);
    for (let d = Atomics.load(ctrl, TREE_CTRL.done); d < helpers; d = Atomics.load(ctrl, TREE_CTRL.done)) {
      Atomics.wait(ctrl, TREE_CTRL.done, d);
    }
    const { ex, ey, ez } = v.out;
    out.ex.set(ex.subarray(0, n)); out.ey.set(ey.subarray(0, n)); out.ez.set(ez.subarray(0, n));
  }

  async close(): Promise<void> {
    await this.exec.close(() => {
      Atomics.store(this.v.ctrl, TREE_CTRL.stop, 1);
      Atomics.add(this.v.ctrl, TREE_CTRL.gen, 1);
      Atomics.notify(this.v.ctrl, TREE_CTRL.gen);
    });
  }
}
