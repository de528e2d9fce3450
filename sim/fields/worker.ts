// Worker thread of solve.ts: solves unit problems on the operator shared through workerData.
import { workerData } from 'node:worker_threads';
import { serveTasks } from '../core/executor.js';
import type { FieldOperator } from './operator.js';
import type { Multigrid } from './multigrid.js';
import { multigridOf, solveUnit, warmUp, type UnitResult, type UnitTask } from './unit.js';

const { symmetry } = workerData as { symmetry: 'planar' | 'axial' | 'none' };
warmUp(symmetry);
// The operator comes with each task (its arrays are shared memory, not copies); its multigrid
// hierarchy (the coarsest level's factors) is built once per operator.
let cached: { serial: number; mg: Multigrid } | undefined;
serveTasks<UnitTask & { op: FieldOperator }, UnitResult>((t) => {
  if (cached?.serial !== t.op.serial) cached = { serial: t.op.serial, mg: multigridOf(t.op) };
  return solveUnit(t.op, cached.mg, t);
}, (r) => [r.x.buffer as ArrayBuffer]);
