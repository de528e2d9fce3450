// The discrete problem of a grid, built once on the main thread and shared (SharedArrayBuffer) with
// the worker threads that solve its unit problems: levels, diagonals, fine labels, boundary terms.

import type { FieldProblem } from './problem.js';
import { axesOf, levelsOf } from './grid.js';
import { ElectrodeSet } from './electrode.js';
import { assembleLevel, labelLevel, packTerms, type BoundaryTerms, type LevelOperator } from './assemble.js';

export interface FieldOperator {
  /** Per level, finest first. */
  ops: LevelOperator[];
  /** Fine labels (assemble.ts FACE / FREE / electrode index). */
  labels: Int16Array;
  terms: BoundaryTerms;
  electrodes: number;
  /** Identifies this operator to the worker threads that cache its multigrid hierarchy. */
  serial: number;
  /** Coarse-grid scale 2^(d−2) (stencil.ts restrictResidual). */
  scale: number;
}

export function electrodeSets(problem: FieldProblem): ElectrodeSet[] {
  return problem.electrodes.map((e) => new ElectrodeSet(e, problem.grid.symmetry));
}

export function buildOperator(problem: FieldProblem): FieldOperator {
  const axes = axesOf(problem.grid), levels = levelsOf(problem.grid), els = electrodeSets(problem);
  const ops: LevelOperator[] = [];
  let labels: Int16Array = new Int16Array(0), terms: BoundaryTerms | undefined;
  levels.forEach((lv, l) => {
    const lab: Int16Array = l === 0 ? new Int16Array(new SharedArrayBuffer(Math.max(2, lv.nodes * 2))) : new Int16Array(lv.nodes);
    labelLevel(lv, axes, els, lab);
    const t = l === 0 ? { node: [] as number[], coef: [] as number[], electrode: [] as number[] } : undefined;
    ops.push(assembleLevel(lv, axes, els, lab, t));
    if (t !== undefined) { labels = lab; terms = packTerms(t); }
  });
  return { ops, labels, terms: terms!, electrodes: problem.electrodes.length, serial: 0, scale: problem.grid.symmetry === 'planar' ? 1 : 2 };
}

/** Bytes the shared part holds. */
export function operatorBytes(op: FieldOperator): number {
  return op.ops.reduce((s, o) => s + o.diag.byteLength + o.rows.node.length * 61, 0) + op.labels.byteLength + op.terms.node.length * 14;
}
