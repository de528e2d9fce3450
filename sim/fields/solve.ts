// solveField: the operator once, then one unit solution per electrode, in parallel on worker
// threads (the main thread computes too). Results are the same whatever the worker count: each unit
// is computed by the same code on the same shared operator.

import { availableParallelism } from 'node:os';
import { Executor, workerScript } from '../core/executor.js';
import { FieldInputError, type FieldProblem, type FieldSolution, type Vec3 } from './problem.js';
import { buildOperator, operatorBytes, type FieldOperator } from './operator.js';
import { multigridOf, solveUnit, type UnitResult, type UnitTask } from './unit.js';
import { FACE } from './assemble.js';
import { axesOf } from './grid.js';
import type { Multigrid } from './multigrid.js';

export interface SolveOptions {
  /** Computing threads (default: one per electrode, at most the machine's cores). */
  workers?: number;
  /** Relative residual ‖D⁻¹(b − A x)‖₂ / ‖D⁻¹b‖₂ to reach, D the diagonal (default 1e-10). */
  tolerance?: number;
  maxIterations?: number;
}

export const DEFAULT_TOLERANCE = 1e-10;
export const DEFAULT_MAX_ITERATIONS = 200;

let serials = 0;

export async function solveField(problem: FieldProblem, opts: SolveOptions = {}): Promise<FieldSolution> {
  const t0 = performance.now();
  const E = problem.electrodes.length;
  const threads = Math.max(1, Math.min(opts.workers ?? availableParallelism(), E));
  const nw = threads - 1;
  // The workers start (and compile their kernels, unit.ts warmUp) while this thread builds the operator.
  const tolerance = opts.tolerance ?? DEFAULT_TOLERANCE;
  const maxIterations = opts.maxIterations ?? problem.grid.maxIterations ?? DEFAULT_MAX_ITERATIONS;
  const results: UnitResult[] = [];
  let mg: Multigrid | undefined;
  const exec = new Executor<UnitTask & { op: FieldOperator }, UnitResult>({
    workers: nw, script: nw > 0 ? workerScript(new URL('./worker.js', import.meta.url)) : undefined,
    workerData: () => ({ symmetry: problem.grid.symmetry }),
  });
  let op: FieldOperator;
  try {
    op = buildOperator(problem);
    op.serial = ++serials;
    await exec.runOrdered({
      count: E,
      task: (e) => ({ electrode: e, tolerance, maxIterations, op }),
      here: (t) => solveUnit(op, mg ??= multigridOf(op), t),
      onResult: (r) => { results.push(r); },
    });
  } finally {
    await exec.close();
  }
  op = op!;
  for (const r of results) {
    if (!r.converged) {
      // Named at grid.max_iterations when the scene set it (its line), else at the grid block.
      const key = problem.grid.maxIterations !== undefined ? 'grid.max_iterations' : 'grid';
      throw new FieldInputError(key, `the field of electrode '${problem.electrodes[r.electrode].name}' did not converge: relative residual ${r.residual.toExponential(2)} after ${r.iterations} iterations, tolerance ${tolerance.toExponential(0)}; expected a solve within grid.max_iterations (${maxIterations}, a count): raise it, or look for an electrode that nearly touches another at a different potential`);
    }
  }
  const lv = op.ops[0].level, g = lv.guard;
  const inside = new Int16Array(lv.nodes);
  for (let n = 0; n < lv.nodes; n++) inside[n] = op.labels[n] === FACE ? -1 : op.labels[n];
  const axes = axesOf(problem.grid);
  const origin: Vec3 = [axes[0].lo, axes[1].lo, axes.length === 3 ? axes[2].lo : 0];
  const perSolve = results.reduce((m, r) => Math.max(m, r.bytes), 0);
  return {
    grid: { symmetry: problem.grid.symmetry, origin, spacing: problem.grid.spacing, shape: [lv.n[0], lv.n[1], lv.n[2]], mirror: [...problem.grid.mirror] },
    units: results.map((r) => new Float64Array(r.x.buffer, g * 8, lv.nodes)),
    inside,
    stats: {
      iterations: results.map((r) => r.iterations),
      residual: results.map((r) => r.residual),
      contraction: results.map((r) => (r.iterations > 0 ? r.residual ** (1 / r.iterations) : 0)),
      wallSeconds: (performance.now() - t0) / 1e3,
      memoryBytes: operatorBytes(op) + Math.min(threads, E) * perSolve + E * lv.nodes * 8 + inside.byteLength,
    },
  };
}

export type { FieldOperator };
