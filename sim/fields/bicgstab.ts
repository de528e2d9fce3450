// BiCGSTAB with right preconditioning (van der Vorst, SIAM J. Sci. Stat. Comput. 13 (1992) 631;
// Saad, Iterative Methods for Sparse Linear Systems, 2nd ed., SIAM 2003, algorithm 7.7 with the
// preconditioned variant of §9.3.4). The shadow residual is r̂ = r₀ = b, which is nonzero only next
// to the electrode, so it is kept as a sparse list. With x₀ = 0 the vectors are x, r (s overwrites
// it), p, v, y (holding p̂ = M p, then ŝ = M s) and t = A ŝ; on large grids (no t given) t is not
// stored but computed along each grid line twice (once for ω, once for the update), which saves a
// sixth of the memory for two more operator applications per iteration.

import type { LevelOperator } from './assemble.js';
import { applyA, lineApply, rowsApply } from './stencil.js';
import type { Multigrid } from './multigrid.js';

export interface KrylovResult { iterations: number; residual: number; converged: boolean }

export interface KrylovVectors { x: Float64Array; r: Float64Array; p: Float64Array; v: Float64Array; y: Float64Array; t?: Float64Array }

/**
 * ‖D⁻¹ r‖₂ with D the diagonal: the residual of the row-scaled system, so that the rows of nodes
 * very close to a surface (coefficients up to 1/THETA_MIN) do not inflate ‖b‖ and hide the error
 * of every other row.
 */
function scaledNorm(op: LevelOperator, r: Float64Array, sumSquares = -1): number {
  const d = op.diag, rows = op.rows;
  let s = 0;
  if (op.level.uniform) {
    // Every regular row has the diagonal 2d, fixed nodes have r = 0, the others are the stored
    // rows: Σ r² over all nodes (often already summed by the caller) corrected on the stored rows.
    let all = sumSquares;
    if (all < 0) { all = 0; for (let i = 0; i < r.length; i++) all += r[i] * r[i]; }
    for (let q = 0; q < rows.node.length; q++) { const v = r[rows.node[q]]; all -= v * v; }
    s = Math.max(0, all) / (2 * op.level.dims) ** 2;
  } else {
    for (let i = 0; i < r.length; i++) { const di = d[i]; if (di > 0) { const v = r[i] / di; s += v * v; } }
  }
  for (let q = 0; q < rows.node.length; q++) { const v = r[rows.node[q]] / rows.diag[q]; s += v * v; }
  return Math.sqrt(s);
}

function sparseDot(idx: Int32Array, val: Float64Array, a: Float64Array): number {
  let s = 0;
  for (let q = 0; q < idx.length; q++) s += val[q] * a[idx[q]];
  return s;
}

/** Solves A x = b with r holding b on entry; x starts at 0. Relative residual ‖D⁻¹r‖₂/‖D⁻¹b‖₂. */
export function bicgstab(op: LevelOperator, mg: Multigrid, w: KrylovVectors, tolerance: number, maxIterations: number): KrylovResult {
  const { x, r, p, v, y, t } = w, N = x.length;
  const lv = op.level, [, ny, nz] = lv.n, nx = lv.n[0];
  const tRows = new Float64Array(op.rows.node.length), line = new Float64Array(nx);
  x.fill(0);
  let m = 0;
  for (let i = 0; i < N; i++) if (r[i] !== 0) m++;
  const hatIdx = new Int32Array(m), hatVal = new Float64Array(m);
  for (let i = 0, q = 0; i < N; i++) if (r[i] !== 0) { hatIdx[q] = i; hatVal[q++] = r[i]; }
  const bnorm = scaledNorm(op, r);
  if (bnorm === 0) return { iterations: 0, residual: 0, converged: true };
  p.set(r);
  let rho = sparseDot(hatIdx, hatVal, r), res = 1;
  for (let it = 1; it <= maxIterations; it++) {
    mg.apply(p, y);                       // p̂ = M p
    applyA(op, y, v);                     // v = A p̂
    const alpha = rho / sparseDot(hatIdx, hatVal, v);
    let ss = 0;
    for (let i = 0; i < N; i++) { x[i] += alpha * y[i]; const si = r[i] - alpha * v[i]; r[i] = si; ss += si * si; }
    const sres = scaledNorm(op, r, ss) / bnorm;
    if (sres <= tolerance) return { iterations: it, residual: sres, converged: true };
    mg.apply(r, y);                       // ŝ = M s
    let omega: number, rr = 0;
    if (t !== undefined) {
      applyA(op, y, t);
      let ts = 0, tt = 0;
      for (let i = 0; i < N; i++) { ts += t[i] * r[i]; tt += t[i] * t[i]; }
      omega = ts / tt;
      for (let i = 0; i < N; i++) { x[i] += omega * y[i]; const ri = r[i] - omega * t[i]; r[i] = ri; rr += ri * ri; }
    } else {
      rowsApply(op, y, tRows);              // t = A ŝ, line by line
      let ts = 0, tt = 0;
      for (let k = 0; k < nz; k++) for (let j = 0; j < ny; j++) {
        lineApply(op, y, j, k, tRows, line);
        const row = lv.guard + (k * ny + j) * nx;
        for (let i = 0; i < nx; i++) { const ti = line[i]; ts += ti * r[row + i]; tt += ti * ti; }
      }
      omega = ts / tt;
      for (let k = 0; k < nz; k++) for (let j = 0; j < ny; j++) {
        lineApply(op, y, j, k, tRows, line);
        const row = lv.guard + (k * ny + j) * nx;
        for (let i = 0; i < nx; i++) { const n = row + i; x[n] += omega * y[n]; const ri = r[n] - omega * line[i]; r[n] = ri; rr += ri * ri; }
      }
    }
    res = scaledNorm(op, r, rr) / bnorm;
    if (res <= tolerance) return { iterations: it, residual: res, converged: true };
    const rhoNew = sparseDot(hatIdx, hatVal, r), beta = (rhoNew / rho) * (alpha / omega);
    rho = rhoNew;
    for (let i = 0; i < N; i++) p[i] = r[i] + beta * (p[i] - omega * v[i]);
  }
  return { iterations: maxIterations, residual: res, converged: false };
}
