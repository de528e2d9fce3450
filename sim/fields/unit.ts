// One unit solution: electrode e at 1 V, every other electrode and the grounded box at 0 V.

import type { FieldOperator } from './operator.js';
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
  /** Bytes this solve held (its six vectors and the coarse-level work arrays). */
  bytes: number;
}

export function multigridOf(op: FieldOperator): Multigrid {
  return new Multigrid(op.ops, op.scale);
}

export function solveUnit(op: FieldOperator, mg: Multigrid, t: UnitTask): UnitResult {
  const t0 = performance.now();
  const lv = op.ops[0].level, len = op.ops[0].diag.length, g = lv.guard;
  const vec = () => new Float64Array(len);
  const w = { x: vec(), r: vec(), p: vec(), v: vec(), t: vec(), y: vec() }, { x, r } = w;
  const { node, coef, electrode } = op.terms;
  for (let q = 0; q < node.length; q++) if (electrode[q] === t.electrode) r[g + node[q]] += coef[q];
  const res = bicgstab(mg.ops[0], mg, w, t.tolerance, t.maxIterations);
  const lab = op.labels;
  for (let n = 0; n < lv.nodes; n++) if (lab[n] === t.electrode) x[g + n] = 1;
  return {
    electrode: t.electrode, x, iterations: res.iterations, residual: res.residual, converged: res.converged,
    seconds: (performance.now() - t0) / 1e3, bytes: 6 * len * 8 + mg.workBytes,
  };
}
