// Direct Coulomb sum split over threads: this thread and (threads − 1) worker_threads share the
// positions, charges and field through SharedArrayBuffers, so a step stays synchronous.
//
// Work is the symmetric pair loop cut into tiles (I, J), I ≤ J, of B ions each. Tile (I, J) adds
// sources J to the running sums of targets I and sources I to targets J. For the sums to keep
// ascending source order (and so the exact bits of directField, see direct.ts), tile (I, J) must
// follow (I − 1, J) and (I, J − 1): the tiles of one anti-diagonal I + J = d touch disjoint
// blocks and run concurrently, with a barrier between anti-diagonals (a wavefront). The result
// does not depend on the thread count or on B.

import { fieldTile, COULOMB_K, type ChargeCloud, type FieldOut } from './direct.js';
import type { FieldSolver } from './ensemble-step.js';
import { Executor, workerScript } from '../core/executor.js';

/** Control words in the shared Int32Array. */
export const CTRL = { gen: 0, n: 1, stop: 2, threads: 3, block: 4, barCount: 5, barGen: 6 } as const;

export interface SharedLayout {
  ctrl: SharedArrayBuffer;   // Int32 × 8
  data: SharedArrayBuffer;   // Float64 × (7 · capacity + 1): x y z qs ex ey ez, then ε²
  capacity: number;
}

export function views(l: SharedLayout) {
  const c = l.capacity, f = (k: number) => new Float64Array(l.data, 8 * k * c, c);
  return {
    ctrl: new Int32Array(l.ctrl),
    cloud: { n: 0, x: f(0), y: f(1), z: f(2), qs: f(3) } as ChargeCloud,
    out: { ex: f(4), ey: f(5), ez: f(6) } as FieldOut,
    eps2: new Float64Array(l.data, 8 * 7 * c, 1),
  };
}

/** All threads meet here; a short spin first, since a wavefront step is ~0.1 ms of work. */
function barrier(ctrl: Int32Array, P: number): void {
  const g = Atomics.load(ctrl, CTRL.barGen);
  if (Atomics.add(ctrl, CTRL.barCount, 1) === P - 1) {
    Atomics.store(ctrl, CTRL.barCount, 0);
    Atomics.add(ctrl, CTRL.barGen, 1);
    Atomics.notify(ctrl, CTRL.barGen);
    return;
  }
  for (let k = 0; k < 2000; k++) if (Atomics.load(ctrl, CTRL.barGen) !== g) return;
  while (Atomics.load(ctrl, CTRL.barGen) === g) Atomics.wait(ctrl, CTRL.barGen, g);
}

/** This thread's share of the wavefront: tile k of anti-diagonal d goes to thread k mod P. */
export function wavefront(v: ReturnType<typeof views>, rank: number): void {
  const ctrl = v.ctrl, P = Atomics.load(ctrl, CTRL.threads), B = Atomics.load(ctrl, CTRL.block);
  const n = Atomics.load(ctrl, CTRL.n), eps2 = v.eps2[0];
  v.cloud.n = n;
  const nb = Math.ceil(n / B);
  for (let d = 0; d <= 2 * (nb - 1); d++) {
    let k = 0;
    for (let I = Math.max(0, d - nb + 1); 2 * I <= d; I++, k++) {
      if (k % P !== rank) continue;
      const J = d - I;
      fieldTile(v.cloud, eps2, I * B, Math.min(n, (I + 1) * B), J * B, Math.min(n, (J + 1) * B), v.out);
    }
    barrier(ctrl, P);
  }
}

export class ParallelDirect implements FieldSolver {
  private readonly v: ReturnType<typeof views>;
  private gen = 0;

  private constructor(private readonly layout: SharedLayout, private readonly exec: Executor<never, never>, readonly threads: number) {
    this.v = views(layout);
  }

  /** Starts (threads − 1) workers for clouds of up to `capacity` ions. Call close() when done. */
  static async create(threads: number, capacity: number): Promise<ParallelDirect> {
    const P = Math.max(1, Math.floor(threads));
    const layout: SharedLayout = {
      ctrl: new SharedArrayBuffer(4 * 8), data: new SharedArrayBuffer(8 * (7 * capacity + 1)), capacity,
    };
    new Int32Array(layout.ctrl)[CTRL.threads] = P;
    // The workers take their work through the shared control words, not task messages; a forgotten
    // close() must not keep the process alive.
    const exec = new Executor<never, never>({
      workers: P - 1, script: P > 1 ? workerScript(new URL('./direct-worker.js', import.meta.url)) : undefined,
      workerData: (rank) => ({ layout, rank }), unref: true,
    });
    await exec.ready();
    return new ParallelDirect(layout, exec, P);
  }

  field(c: ChargeCloud, softening: number, out: FieldOut): void {
    const n = c.n, v = this.v;
    if (n > this.layout.capacity) throw new RangeError(`parallel direct sum sized for ${this.layout.capacity} ions, got ${n}`);
    v.cloud.x.set(c.x.subarray(0, n)); v.cloud.y.set(c.y.subarray(0, n)); v.cloud.z.set(c.z.subarray(0, n));
    v.cloud.qs.set(c.qs.subarray(0, n));
    v.out.ex.fill(0, 0, n); v.out.ey.fill(0, 0, n); v.out.ez.fill(0, 0, n);
    v.eps2[0] = softening * softening;
    // About 4P tiles per block row keeps threads busy on every anti-diagonal; ≥ 32 ions per tile
    // keeps the barrier cost small. B does not change the result.
    const B = Math.max(32, Math.ceil(n / (4 * this.threads)));
    Atomics.store(v.ctrl, CTRL.block, B);
    Atomics.store(v.ctrl, CTRL.n, n);
    this.gen++;
    Atomics.store(v.ctrl, CTRL.gen, this.gen);
    Atomics.notify(v.ctrl, CTRL.gen);
    wavefront(v, 0); // ends with a barrier: every tile is done
    const { ex, ey, ez } = v.out;
    for (let i = 0; i < n; i++) { out.ex[i] = COULOMB_K * ex[i]; out.ey[i] = COULOMB_K * ey[i]; out.ez[i] = COULOMB_K * ez[i]; }
  }

  async close(): Promise<void> {
    await this.exec.close(() => {
      Atomics.store(this.v.ctrl, CTRL.stop, 1);
      Atomics.add(this.v.ctrl, CTRL.gen, 1);
      Atomics.notify(this.v.ctrl, CTRL.gen);
    });
  }
}
