// The task of the executor tests, shared by this thread and the test worker (executor-worker.ts).

export interface SleepTask {
  i: number;
  /** How long the task takes, ms (makes workers finish out of task order). */
  ms: number;
  /** Throw instead of answering. */
  fail?: boolean;
}

export interface SleepResult {
  i: number;
  /** A value that depends on i only, computed in floating point. */
  value: number;
  /** Date.now() when the task finished (one wall clock for all threads). */
  finishedAt: number;
}

const nap = new Int32Array(new SharedArrayBuffer(4));

export function sleepTask(t: SleepTask): SleepResult {
  if (t.fail) throw new Error(`task ${t.i} failed on purpose`);
  if (t.ms > 0) Atomics.wait(nap, 0, 0, t.ms);
  let v = 0;
  for (let k = 1; k <= 1000; k++) v += Math.sin(t.i * k) / k;
  return { i: t.i, value: v, finishedAt: Date.now() };
}
