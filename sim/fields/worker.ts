// Worker thread of solve.ts: solves unit problems on the operator shared through workerData.
import { workerData } from 'node:worker_threads';
import { serveTasks } from '../core/executor.js';
import type { FieldOperator } from './operator.js';
import { multigridOf, solveUnit, type UnitResult, type UnitTask } from './unit.js';

const op = workerData as FieldOperator;
const mg = multigridOf(op);
serveTasks<UnitTask, UnitResult>((t) => solveUnit(op, mg, t), (r) => [r.x.buffer as ArrayBuffer]);
