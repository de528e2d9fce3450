// One unit solution: electrode e at 1 V, every other electrode and the grounded box at 0 V.

import { buildOperator, type FieldOperator } from './operator.js';
import type { FieldProblem, Shape } from './problem.js';
import { Multigrid } from './multigrid.js';
import { bicgstab } from './bicgstab.js';

export interface UnitTask { electrode: number; tolerance: number; maxIterations: number }

export interface UnitResult {
  electrode: number;
  /** Guarded node values (FieldOperator level 0 layout). */
  x: Float64Array;
  iterations: number;
  residual: number;
  converged: boolean;
  seconds: number;
  /** Bytes this solve held (its five or six vectors and the coarse-level work arrays). */
  bytes: number;
}

/** Grids up to this many nodes keep t = A ŝ as a vector (bicgstab.ts); larger ones recompute it. */
export const STORE_T_MAX = 5_000_000;

export function multigridOf(op: FieldOperator): Multigrid {
  return new Multigrid(op.ops, op.scale);
}

export function solveUnit(op: FieldOperator, mg: Multigrid, t: UnitTask): UnitResult {
  const t0 = performance.now();
  const lv = op.ops[0].level, len = op.ops[0].diag.length, g = lv.guard;
  const vec = () => new Float64Array(len);
  const store = len <= STORE_T_MAX;
  const w = { x: vec(), r: vec(), p: vec(), v: vec(), y: vec(), t: store ? vec() : undefined }, { x, r } = w;
  const { node, coef, electrode } = op.terms;
  for (let q = 0; q < node.length; q++) if (electrode[q] === t.electrode) r[g + node[q]] += coef[q];
  const res = bicgstab(mg.ops[0], mg, w, t.tolerance, t.maxIterations);
  const lab = op.labels;
  for (let n = 0; n < lv.nodes; n++) if (lab[n] === t.electrode) x[g + n] = 1;
  return {
    electrode: t.electrode, x, iterations: res.iterations, residual: res.residual, converged: res.converged,
    seconds: (performance.now() - t0) / 1e3, bytes: (store ? 6 : 5) * len * 8 + mg.workBytes,
  };
}

/**
 * Runs the kernels of a grid kind once on a small box (a plate at 1 V on one face), so that a fresh
 * worker thread compiles them while the main thread is still building the operator, instead of
 * interpreting the first cycles of a large grid.
 */
export function warmUp(symmetry: FieldProblem['grid']['symmetry']): void {
  const plate: Shape = symmetry === 'none' ? { kind: 'box', min: [-1, -1, 0.9], max: [1, 1, 1] } : { kind: 'rectangle', min: [-1, 0.9], max: [1, 1] };
  const problem: FieldProblem = {
    grid: { symmetry, spacing: symmetry === 'none' ? 1 / 8 : 1 / 32, halfWidth: 1, radius: 1, length: 1, mirror: [] },
    electrodes: [{ name: 'plate', potential: { dc: 1, rf: 0, aux: 0 }, shapes: [symmetry === 'axial' ? { kind: 'tube', innerRadius: 0, outerRadius: 1, from: 0.9, to: 1 } : plate], holes: [] }],
  };
  const op = buildOperator(problem);
  for (let r = 0; r < 3; r++) solveUnit(op, multigridOf(op), { electrode: 0, tolerance: 1e-10, maxIterations: 50 });
}
