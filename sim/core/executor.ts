// Worker threads, once for the whole project: the engine's batches, the direct sweep's point
// batches and the parallel Coulomb sum all start, feed and stop their workers here.
//
// Tasks are numbered 0..count−1 and handed out in that order to whichever thread has room (each
// worker keeps `inflight` tasks queued so it never waits for this thread to feed it); results are
// delivered in task order whatever order they finish in. Which thread computes a task never
// changes its result, so output does not depend on the worker count.
//
// This is the ground floor of sim/: it knows nothing of scenes, batches or fields.

import { Worker, parentPort } from 'node:worker_threads';
import { existsSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

/** What a worker posts once it is ready to share work (see announceReady). */
const READY = 'ready';

/**
 * The compiled file of a worker module, named beside its user: `new URL('./worker.js', import.meta.url)`.
 * From dist/ that file itself; tests run the TypeScript sources, and a worker thread cannot load
 * those, so they get the copy under dist/ (`npm test` builds dist/ first).
 */
export function workerScript(url: URL): string {
  const path = fileURLToPath(url);
  const here = fileURLToPath(import.meta.url);
  if (here.endsWith('.js')) return path;
  const root = resolve(dirname(here), '..', '..');
  const dist = join(root, 'dist', relative(root, path));
  if (!existsSync(dist)) throw new Error(`worker script ${dist} missing: run 'npm run build' first`);
  return dist;
}

export interface ExecutorOptions {
  /** Worker threads to start (0: this thread does all the work). */
  workers: number;
  /** From workerScript(); needed when workers > 0. */
  script?: string;
  /** workerData of the worker of each rank 1..workers (rank 0 is this thread). */
  workerData?: (rank: number) => unknown;
  /** Tasks queued per worker (default 1). */
  inflight?: number;
  /** Workers that must not keep the process alive (a forgotten close()). */
  unref?: boolean;
}

export interface OrderedTasks<T, R> {
  count: number;
  /** The message of task i (built when the task is handed out). */
  task: (i: number) => T;
  /** When given, this thread computes tasks too, between handing results on. */
  here?: (task: T) => R;
  /** Each result, in task order. */
  onResult: (result: R, i: number) => void;
  /** Polled before each task is handed out: true hands out no more (Ctrl-C). */
  stopped?: () => boolean;
  /**
   * Once stopped, return without waiting for the tasks in flight: their results are dropped, and
   * the executor is spent (close() terminates the workers). A stop is then seen within
   * ABANDON_POLL_MS even while every worker is busy with a long task.
   */
  abandon?: boolean;
}

/** How often a run that may abandon its tasks looks at stopped() while it waits for workers. */
const ABANDON_POLL_MS = 100;

interface Slot {
  w: Worker;
  inflight: number;
  ready: Promise<void>;
  exited: Promise<void>;
}

export class Executor<T, R> {
  private slots: Slot[] = [];
  private readonly inflight: number;
  private readonly waiting = new Map<number, (result: R) => void>();
  private nextId = 0;
  private failure: { error: unknown } | null = null;
  private closing = false;
  /** Set when a run returned with tasks still in flight: close() must terminate, not ask. */
  private abandoned = false;
  /** Hands the next task of the current run to a slot; false when there is none to hand out. */
  private source: ((slot: Slot) => boolean) | null = null;
  /** Wakes the current run when a result or a failure arrives. */
  private wake: (() => void) | null = null;

  constructor(opts: ExecutorOptions) {
    this.inflight = Math.max(1, opts.inflight ?? 1);
    for (let rank = 1; rank <= opts.workers; rank++) this.slots.push(this.spawn(opts, rank));
  }

  /** Worker threads started. */
  get workers(): number {
    return this.slots.length;
  }

  private spawn(opts: ExecutorOptions, rank: number): Slot {
    if (opts.script === undefined) throw new Error('executor: workers need a script');
    const w = new Worker(opts.script, { workerData: opts.workerData?.(rank) });
    if (opts.unref) w.unref();
    let isReady = (): void => {}, notReady = (_e: unknown): void => {};
    const ready = new Promise<void>((res, rej) => { isReady = res; notReady = rej; });
    ready.catch(() => {}); // a failure is also reported through the run or ready() that waits for it
    const slot: Slot = { w, inflight: 0, ready, exited: new Promise<void>((r) => w.once('exit', () => r())) };
    w.on('message', (m: typeof READY | { id: number; result: R }) => {
      if (m === READY) { isReady(); return; }
      slot.inflight--;
      const deliver = this.waiting.get(m.id);
      this.waiting.delete(m.id);
      deliver?.(m.result);
      this.feed(slot);
      this.poke();
    });
    w.on('error', (e) => { notReady(e); this.fail(e); });
    w.once('exit', (code) => {
      // A worker that stops on its own leaves its tasks unanswered: without this a run would wait forever.
      const e = new Error(`worker thread stopped unexpectedly (exit code ${code})`);
      notReady(e);
      if (!this.closing) this.fail(e);
    });
    return slot;
  }

  private fail(error: unknown): void {
    this.failure ??= { error };
    this.poke();
  }

  private poke(): void {
    const w = this.wake;
    this.wake = null;
    w?.();
  }

  private feed(slot: Slot): void {
    while (slot.inflight < this.inflight && this.source !== null && this.source(slot));
  }

  private post(slot: Slot, task: T, deliver: (result: R) => void): void {
    const id = this.nextId++;
    this.waiting.set(id, deliver);
    slot.inflight++;
    slot.w.postMessage({ id, task });
  }

  /** Resolves once every worker has called announceReady(); rejects if one fails first. */
  async ready(): Promise<void> {
    await Promise.all(this.slots.map((s) => s.ready));
  }

  /**
   * Runs tasks 0..count−1 on the workers (and this thread when `here` is given); resolves to the
   * number of results delivered, always the first ones in order (fewer than count when stopped).
   * The first error of a worker or of onResult rejects the run, after which the executor is spent.
   */
  async runOrdered(t: OrderedTasks<T, R>): Promise<number> {
    if (this.slots.length === 0 && t.here === undefined) throw new Error('executor: no worker and no task for this thread');
    if (this.source !== null) throw new Error('executor: one run at a time');
    if (this.abandoned) throw new Error('executor: spent by an abandoned run');
    const pending = new Map<number, R>();
    let next = 0, delivered = 0, outstanding = 0;
    const halted = () => this.failure !== null || (t.stopped?.() ?? false);
    const deliver = () => {
      try {
        while (pending.has(delivered)) {
          const r = pending.get(delivered)!;
          pending.delete(delivered);
          t.onResult(r, delivered);
          delivered++;
        }
      } catch (e) {
        this.fail(e);
      }
    };
    this.source = (slot) => {
      if (next >= t.count || halted()) return false;
      const i = next++;
      outstanding++;
      this.post(slot, t.task(i), (r) => { outstanding--; pending.set(i, r); deliver(); });
      return true;
    };
    try {
      for (const s of this.slots) this.feed(s);
      while (t.here !== undefined && next < t.count && !halted()) {
        const i = next++;
        pending.set(i, t.here(t.task(i)));
        deliver();
        await new Promise((r) => setImmediate(r)); // lets worker results and a pending SIGINT in
      }
      while (outstanding > 0 && this.failure === null) {
        if (t.abandon && halted()) {
          // Late results must not reach onResult after this run has returned.
          this.abandoned = true;
          this.waiting.clear();
          break;
        }
        await new Promise<void>((r) => {
          this.wake = r;
          if (t.abandon) setTimeout(r, ABANDON_POLL_MS);
        });
      }
    } finally {
      this.source = null;
      this.wake = null;
    }
    if (this.failure !== null) throw this.failure.error;
    return delivered;
  }

  /**
   * Stops the workers and waits until they have exited. By default each is sent null (serveTasks
   * ends on it) after the tasks queued before; `tell` replaces that for workers stopped another way.
   */
  async close(tell?: () => void): Promise<void> {
    this.closing = true;
    for (const s of this.slots) s.w.ref(); // keep the loop alive until they have exited
    if (this.abandoned) for (const s of this.slots) void s.w.terminate();
    else if (tell !== undefined) tell();
    else for (const s of this.slots) s.w.postMessage(null);
    await Promise.all(this.slots.map((s) => s.exited));
    this.slots = [];
  }
}

/**
 * Worker side of runOrdered: answers each task with run(task) in arrival order; null ends the
 * worker. `transfer` names buffers of a result to move rather than copy.
 */
export function serveTasks<T, R>(run: (task: T) => R, transfer: (result: R) => ArrayBuffer[] = () => []): void {
  const port = parentPort;
  if (port === null) throw new Error('serveTasks runs in a worker thread');
  port.on('message', (m: { id: number; task: T } | null) => {
    if (m === null) { port.close(); return; }
    const result = run(m.task);
    port.postMessage({ id: m.id, result }, transfer(result));
  });
}

/** Worker side of Executor.ready(), for workers that take their work another way (shared memory). */
export function announceReady(): void {
  if (parentPort === null) throw new Error('announceReady runs in a worker thread');
  parentPort.postMessage(READY);
}
