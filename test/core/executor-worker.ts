// Test worker of test/core/executor.test.ts: the executor's own task loop around sleepTask.
import { serveTasks } from '../../sim/core/executor.js';
import { sleepTask } from './executor-task.js';

serveTasks(sleepTask);
