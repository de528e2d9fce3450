// Direct Coulomb sum split over threads: this thread and (threads − 1) worker_threads share the
// positions, charges and field through SharedArrayBuffers and meet at Atomics barriers, so a step
// stays synchronous. Target ion ranges are cut evenly; fieldBlock sums every target in ascending
// source order whatever the cut, so the field has the same bits for any thread count (see
// direct.ts). Cost per block of b ions: b·(N − b) one-sided + b²/2 symmetric pair terms, so two
// threads do 3/8 N² each against N²/2 for one: at most 4/3 faster.

import { Worker } from 'node:worker_threads';
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { fieldBlock, COULOMB_K, type ChargeCloud, type FieldOut } from './direct.js';
import type { FieldSolver } from './ensemble-step.js';

/** Control words in the shared Int32Array. */
export const CTRL = { gen: 0, done: 1, n: 2, stop: 3, threads: 4 } as const;

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

/** Block [a, b) of thread k of P over n targets. */
export function blockOf(k: number, P: number, n: number): [number, number] {
  return [Math.floor((k * n) / P), Math.floor(((k + 1) * n) / P)];
}

function workerScript(): string {
  const here = fileURLToPath(import.meta.url);
  if (here.endsWith('.js')) return here.replace(/parallel\.js$/, 'direct-worker.js');
  const dist = here.replace(/\/sim\/spacecharge\/parallel\.ts$/, '/dist/sim/spacecharge/direct-worker.js');
  if (!existsSync(dist)) throw new Error(`worker script ${dist} missing: run 'npm run build' first`);
  return dist;
}

export class ParallelDirect implements FieldSolver {
  private readonly v: ReturnType<typeof views>;
  private gen = 0;

  private constructor(private readonly layout: SharedLayout, private readonly workers: Worker[], readonly threads: number) {
    this.v = views(layout);
  }

  /** Starts (threads − 1) workers for clouds of up to `capacity` ions. Call close() when done. */
  static async create(threads: number, capacity: number): Promise<ParallelDirect> {
    const P = Math.max(1, Math.floor(threads));
    const layout: SharedLayout = {
      ctrl: new SharedArrayBuffer(8 * 4), data: new SharedArrayBuffer(8 * (7 * capacity + 1)), capacity,
    };
    new Int32Array(layout.ctrl)[CTRL.threads] = P;
    const workers: Worker[] = [];
    if (P > 1) {
      const script = workerScript();
      await Promise.all(Array.from({ length: P - 1 }, (_, k) => new Promise<void>((resolve, reject) => {
        const w = new Worker(script, { workerData: { layout, rank: k + 1 } });
        workers.push(w);
        w.unref(); // a forgotten close() must not keep the process alive
        w.once('message', () => resolve());
        w.once('error', reject);
      })));
    }
    return new ParallelDirect(layout, workers, P);
  }

  field(c: ChargeCloud, softening: number, out: FieldOut): void {
    const n = c.n, v = this.v, P = this.threads;
    if (n > this.layout.capacity) throw new RangeError(`parallel direct sum sized for ${this.layout.capacity} ions, got ${n}`);
    v.cloud.x.set(c.x.subarray(0, n)); v.cloud.y.set(c.y.subarray(0, n)); v.cloud.z.set(c.z.subarray(0, n));
    v.cloud.qs.set(c.qs.subarray(0, n));
    v.cloud.n = n;
    v.eps2[0] = softening * softening;
    Atomics.store(v.ctrl, CTRL.n, n);
    Atomics.store(v.ctrl, CTRL.done, 0);
    this.gen++;
    Atomics.store(v.ctrl, CTRL.gen, this.gen);
    Atomics.notify(v.ctrl, CTRL.gen);
    const [a, b] = blockOf(0, P, n);
    fieldBlock(v.cloud, v.eps2[0], a, b, v.out);
    for (;;) {
      const d = Atomics.load(v.ctrl, CTRL.done);
      if (d >= P - 1) break;
      Atomics.wait(v.ctrl, CTRL.done, d);
    }
    const { ex, ey, ez } = v.out;
    for (let i = 0; i < n; i++) { out.ex[i] = COULOMB_K * ex[i]; out.ey[i] = COULOMB_K * ey[i]; out.ez[i] = COULOMB_K * ez[i]; }
  }

  async close(): Promise<void> {
    Atomics.store(this.v.ctrl, CTRL.stop, 1);
    Atomics.add(this.v.ctrl, CTRL.gen, 1);
    Atomics.notify(this.v.ctrl, CTRL.gen);
    await Promise.all(this.workers.map((w) => new Promise<void>((r) => { w.once('exit', () => r()); })));
  }
}
