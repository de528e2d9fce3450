// Geometric multigrid V-cycle used as the preconditioner of BiCGSTAB (Briggs, Henson & McCormick, A
// Multigrid Tutorial, 2nd ed., SIAM 2000, ch. 3: V-cycle, full weighting = Pᵀ up to scale;
// Trottenberg, Oosterlee & Schüller, Multigrid, Academic Press 2001, §2.5: red–black Gauss–Seidel).
// Pre-smoothing red then black, post-smoothing black then red (the adjoint order; the cycle is
// symmetric wherever the operator is, i.e. away from the cut rows), Pᵀ restriction, coarse levels
// rediscretised from the geometry, an exact solve on the coarsest.
// All work arrays are allocated here once; a cycle allocates nothing.

import type { LevelOperator } from './assemble.js';
import { prolongAdd, relaxPair, restrictResidual, RowScratch } from './stencil.js';

export const PRE_SWEEPS = 2, POST_SWEEPS = 2;

/**
 * Banded LU without pivoting of the coarsest level (Golub & Van Loan, Matrix Computations, 4th ed.,
 * §4.3, band Gaussian elimination; safe without pivoting here: the matrix is a weakly diagonally
 * dominant M-matrix), bandwidth = largest stride; fixed nodes get the identity row.
 */
class BandedLU {
  private readonly A: Float64Array;
  private readonly bw: number;
  private readonly N: number;

  constructor(private readonly op: LevelOperator) {
    const lv = op.level, d = op.diag, [nx, ny, nz] = lv.n, N = lv.nodes, bw = nz > 1 ? lv.sz : lv.sy, W = 2 * bw + 1;
    this.N = N; this.bw = bw;
    const A = new Float64Array(N * W); // A[i][j] at i·W + (j − i + bw)
    const g = lv.guard, off = [-1, 1, -lv.sy, lv.sy, -lv.sz, lv.sz], rows = op.rows;
    for (let k = 0, n = 0; k < nz; k++) for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++, n++) {
      const dn = d[g + n];
      if (dn === 0) { A[n * W + bw] = 1; continue; }
      if (dn < 0) {
        const q = -dn - 1;
        A[n * W + bw] = rows.diag[q];
        for (let s = 0; s < 6; s++) if (rows.off[6 * q + s] !== 0) A[n * W + bw + off[s]] -= rows.off[6 * q + s];
        continue;
      }
      A[n * W + bw] = dn;
      const cx = lv.m[1][j] * lv.m[2][k];
      const w = [cx * lv.em[0][i], cx * lv.ep[0][i], lv.m[0][i] * lv.em[1][j] * lv.m[2][k], lv.m[0][i] * lv.ep[1][j] * lv.m[2][k],
        lv.m[0][i] * lv.m[1][j] * lv.em[2][k], lv.m[0][i] * lv.m[1][j] * lv.ep[2][k]];
      for (let s = 0; s < 6; s++) if (w[s] !== 0 && d[g + n + off[s]] !== 0) A[n * W + bw + off[s]] -= w[s];
    }
    for (let p = 0; p < N; p++) {
      const piv = A[p * W + bw];
      for (let i = p + 1; i <= Math.min(N - 1, p + bw); i++) {
        const l = A[i * W + (p - i + bw)] / piv;
        if (l === 0) continue;
        A[i * W + (p - i + bw)] = l;
        for (let j = p + 1; j <= Math.min(N - 1, p + bw); j++) A[i * W + (j - i + bw)] -= l * A[p * W + (j - p + bw)];
      }
    }
    this.A = A;
  }

  get bytes(): number { return this.A.byteLength; }

  /** x = A⁻¹ b (guarded vectors). */
  solve(b: Float64Array, x: Float64Array): void {
    const { A, bw, N } = this, W = 2 * bw + 1, g = this.op.level.guard;
    for (let i = 0; i < N; i++) {
      let s = b[g + i];
      for (let q = Math.max(0, i - bw); q < i; q++) s -= A[i * W + (q - i + bw)] * x[g + q];
      x[g + i] = s;
    }
    for (let i = N - 1; i >= 0; i--) {
      let s = x[g + i];
      for (let q = i + 1; q <= Math.min(N - 1, i + bw); q++) s -= A[i * W + (q - i + bw)] * x[g + q];
      x[g + i] = s / A[i * W + bw];
    }
  }
}

export class Multigrid {
  private readonly b: Float64Array[] = [];
  private readonly x: Float64Array[] = [];
  private readonly direct: BandedLU;
  private readonly scratch: RowScratch;

  /** `scale` = 2^(d−2): 1 for planar, 2 for axial (r-weighted) and 3D grids. */
  constructor(readonly ops: LevelOperator[], private readonly scale: number) {
    for (let l = 1; l < ops.length; l++) {
      const len = ops[l].diag.length;
      this.b.push(new Float64Array(len)); this.x.push(new Float64Array(len));
    }
    this.scratch = new RowScratch(ops[0].level.n[0]);
    const last = ops[ops.length - 1];
    this.direct = new BandedLU(last);
  }

  /** Bytes of the work arrays of one cycle (levels below the finest). */
  get workBytes(): number {
    return this.b.reduce((s, a) => s + a.byteLength * 2, 0) + this.direct.bytes;
  }

  /** z = M r: one V-cycle from z = 0 on the finest level. */
  apply(r: Float64Array, z: Float64Array): void {
    z.fill(0);
    this.cycle(0, r, z);
  }

  private cycle(l: number, b: Float64Array, x: Float64Array): void {
    const op = this.ops[l];
    if (l === this.ops.length - 1) { this.direct.solve(b, x); return; }
    for (let s = 0; s < PRE_SWEEPS; s++) relaxPair(op, b, x, 0);   // red, then black
    const c = this.ops[l + 1], bc = this.b[l], xc = this.x[l];
    restrictResidual(op, b, x, c, bc, this.scale, this.scratch);
    xc.fill(0);
    this.cycle(l + 1, bc, xc);
    prolongAdd(op, x, c, xc, this.scratch);
    for (let s = 0; s < POST_SWEEPS; s++) relaxPair(op, b, x, 1);  // black, then red
  }
}
