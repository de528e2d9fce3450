// The one worker executor (sim/core/executor.ts): task-order delivery, errors, worker-count
// independence, Ctrl-C polling. Worker threads load the compiled copy under dist/ (npm test builds it).
import { describe, it, expect } from 'vitest';
import { Executor, workerScript, type OrderedTasks } from '../../sim/core/executor.js';
import { sleepTask, type SleepResult, type SleepTask } from './executor-task.js';

const script = workerScript(new URL('./executor-worker.js', import.meta.url));

function start(workers: number, inflight = 1) {
  return new Executor<SleepTask, SleepResult>({ workers, script: workers > 0 ? script : undefined, inflight });
}

async function collect(exec: Executor<SleepTask, SleepResult>, t: Omit<OrderedTasks<SleepTask, SleepResult>, 'onResult'>) {
  const got: SleepResult[] = [];
  const order: number[] = [];
  const n = await exec.runOrdered({ ...t, onResult: (r, i) => { got.push(r); order.push(i); } });
  return { n, got, order };
}

describe('executor', () => {
  it('delivers results in task order when workers finish out of order', async () => {
    const exec = start(3);
    try {
      // Task 0 takes 300 ms, the others none: tasks 1 and 2 finish first on their own workers.
      const { n, got, order } = await collect(exec, { count: 6, task: (i) => ({ i, ms: i === 0 ? 300 : 0 }) });
      expect(n).toBe(6);
      expect(order).toEqual([0, 1, 2, 3, 4, 5]);
      expect(got.map((r) => r.i)).toEqual([0, 1, 2, 3, 4, 5]);
      expect(got[1].finishedAt).toBeLessThan(got[0].finishedAt);
      expect(got[2].finishedAt).toBeLessThan(got[0].finishedAt);
    } finally {
      await exec.close();
    }
  });

  it('gives the same results with 1 and 3 threads (this thread computing too)', async () => {
    const tasks = { count: 40, task: (i: number) => ({ i, ms: i % 7 === 3 ? 5 : 0 }), here: sleepTask };
    const one = await collect(start(0), tasks);
    const exec = start(2, 2);
    try {
      const three = await collect(exec, tasks);
      expect(three.n).toBe(40);
      expect(three.got.map((r) => r.value)).toEqual(one.got.map((r) => r.value));
      expect(three.order).toEqual(one.order);
    } finally {
      await exec.close();
    }
  });

  it('rejects the run with the error thrown in a worker, and still shuts down', async () => {
    const exec = start(2);
    const run = collect(exec, { count: 10, task: (i) => ({ i, ms: 1, fail: i === 4 }) });
    await expect(run).rejects.toThrow('task 4 failed on purpose');
    await exec.close();
    expect(exec.workers).toBe(0);
  });

  it('rejects the run with the error thrown by onResult', async () => {
    const exec = start(1);
    try {
      const run = exec.runOrdered({
        count: 5, task: (i) => ({ i, ms: 0 }), here: sleepTask,
        onResult: (_r, i) => { if (i === 2) throw new Error('disk full'); },
      });
      await expect(run).rejects.toThrow('disk full');
    } finally {
      await exec.close();
    }
  });

  it('hands out no task once stopped() is true and delivers the first results in order', async () => {
    const exec = start(2, 2);
    try {
      let handedOut = 0;
      const order: number[] = [];
      const n = await exec.runOrdered({
        count: 200,
        task: (i) => { handedOut++; return { i, ms: 2 }; },
        here: sleepTask,
        onResult: (_r, i) => { order.push(i); },
        stopped: () => handedOut >= 7, // as a Ctrl-C between the seventh and eighth hand-out would
      });
      // stopped() is polled before each hand-out (by workers and this thread alike): the tasks handed
      // out before it turned true still run and are delivered, none after.
      expect(n).toBe(7);
      expect(handedOut).toBe(7);
      expect(order).toEqual([0, 1, 2, 3, 4, 5, 6]);
    } finally {
      await exec.close();
    }
  });
});
