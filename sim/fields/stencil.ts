// The matrix-free operator of one level (grid.ts weights, assemble.ts diagonal and cut rows) and the
// pieces of a multigrid cycle on it: red–black Gauss–Seidel, residual restricted by the transpose of
// (bi/tri)linear interpolation, and interpolation. Vectors carry a zero guard before and after the
// nodes, and are zero at fixed nodes, so neighbours need no bounds or label tests.
//
// A x at a regular free node n: d_n x_n − Σ_edges w x_nb, with w from grid.ts; at a cut node its
// stored Shortley–Weller row; 0 at fixed nodes (d_n = 0). Regular loops skip d_n ≤ 0.

import type { Level } from './grid.js';
import type { CutRows, LevelOperator } from './assemble.js';

function offsets(lv: Level): number[] {
  return [-1, 1, -lv.sy, lv.sy, -lv.sz, lv.sz];
}

/** The cut row q applied to x (its neighbour sum, without the diagonal). */
function cutSum(rows: CutRows, q: number, x: Float64Array, o0: number, o1: number, o2: number, o3: number, o4: number, o5: number): number {
  const n = rows.node[q], off = rows.off, b = 6 * q;
  return off[b] * x[n + o0] + off[b + 1] * x[n + o1] + off[b + 2] * x[n + o2] + off[b + 3] * x[n + o3] + off[b + 4] * x[n + o4] + off[b + 5] * x[n + o5];
}

/** Stored-row values of A x per operator (this thread's scratch for applyWeighted). */
const rowScratch = new WeakMap<LevelOperator, Float64Array>();

/**
 * The regular nodes of a Cartesian level as runs along x: per grid line (index j + ny·k) the runs
 * start[q] ≤ n < end[q] for q in line[jk] … line[jk + 1] − 1, guarded node indices with d_n > 0.
 * The constant-weight loops walk the runs instead of testing d_n at every node (one array fewer
 * read per sweep). Built once per level and thread, on first use.
 */
interface Runs { line: Int32Array; start: Int32Array; end: Int32Array }
const runsOf = new WeakMap<LevelOperator, Runs>();

function regularRuns(op: LevelOperator): Runs {
  let r = runsOf.get(op);
  if (r !== undefined) return r;
  const lv = op.level, d = op.diag, nx = lv.n[0], lines = lv.n[1] * lv.n[2];
  const line = new Int32Array(lines + 1), st: number[] = [], en: number[] = [];
  for (let jk = 0; jk < lines; jk++) {
    line[jk] = st.length;
    const row = lv.guard + jk * nx;
    for (let i = 0; i < nx;) {
      if (!(d[row + i] > 0)) { i++; continue; }
      const i0 = i;
      while (i < nx && d[row + i] > 0) i++;
      st.push(row + i0); en.push(row + i);
    }
  }
  line[lines] = st.length;
  r = { line, start: Int32Array.from(st), end: Int32Array.from(en) };
  runsOf.set(op, r);
  return r;
}

/** out = A x on a weighted (axial) level, line by line. */
function applyWeighted(op: LevelOperator, x: Float64Array, out: Float64Array): void {
  const lv = op.level, [nx, ny, nz] = lv.n;
  let rows = rowScratch.get(op);
  if (rows === undefined) { rows = new Float64Array(op.rows.node.length); rowScratch.set(op, rows); }
  rowsApply(op, x, rows);
  for (let k = 0; k < nz; k++) for (let j = 0; j < ny; j++) lineApply(op, x, j, k, rows, out, lv.guard + (k * ny + j) * nx);
}

/** out = A x on a Cartesian level: unit weights, diagonal 2d on every regular row. */
function applyUniform(op: LevelOperator, x: Float64Array, out: Float64Array): void {
  const lv = op.level, { sy, sz } = lv, dd = 2 * lv.dims, { start, end } = regularRuns(op), m = start.length;
  // Zero first (fixed nodes stay 0; cut rows are written by applyA after), then the regular runs.
  out.fill(0);
  if (lv.dims === 2) {
    for (let q = 0; q < m; q++) for (let n = start[q], e = end[q]; n < e; n++) out[n] = dd * x[n] - (x[n - 1] + x[n + 1] + x[n - sy] + x[n + sy]);
  } else {
    for (let q = 0; q < m; q++) for (let n = start[q], e = end[q]; n < e; n++) out[n] = dd * x[n] - (x[n - 1] + x[n + 1] + x[n - sy] + x[n + sy] + x[n - sz] + x[n + sz]);
  }
}

/** out = A x. */
export function applyA(op: LevelOperator, x: Float64Array, out: Float64Array): void {
  if (op.level.uniform) applyUniform(op, x, out); else applyWeighted(op, x, out);
  const r = op.rows, [o0, o1, o2, o3, o4, o5] = offsets(op.level);
  for (let q = 0; q < r.node.length; q++) { const n = r.node[q]; out[n] = r.diag[q] * x[n] - cutSum(r, q, x, o0, o1, o2, o3, o4, o5); }
}

/** Half-sweep of colour `colour` over the regular rows of lines j0..j1 of planes k0..k1 (weighted level). */
function relaxWeighted(op: LevelOperator, b: Float64Array, x: Float64Array, colour: number, j0: number, j1: number, k0: number, k1: number): void {
  const lv = op.level, d = op.diag, nx = lv.n[0], ny = lv.n[1], { sy, sz, guard } = lv;
  const m0 = lv.m[0], em0 = lv.em[0], ep0 = lv.ep[0], m1 = lv.m[1], em1 = lv.em[1], ep1 = lv.ep[1], m2 = lv.m[2], em2 = lv.em[2], ep2 = lv.ep[2];
  for (let k = k0; k < k1; k++) {
    for (let j = j0; j < j1; j++) {
      const cx = m1[j] * m2[k], cym = em1[j] * m2[k], cyp = ep1[j] * m2[k], czm = m1[j] * em2[k], czp = m1[j] * ep2[k];
      const row = guard + (k * ny + j) * nx;
      for (let i = (colour + j + k) & 1; i < nx; i += 2) {
        const n = row + i, dn = d[n];
        if (dn <= 0) continue;
        x[n] = (b[n] + cx * (em0[i] * x[n - 1] + ep0[i] * x[n + 1])
          + m0[i] * (cym * x[n - sy] + cyp * x[n + sy] + czm * x[n - sz] + czp * x[n + sz])) / dn;
      }
    }
  }
}

/** Half-sweep of colour `colour` over the regular rows of lines j0..j1 of planes k0..k1 (Cartesian level). */
function relaxUniform(op: LevelOperator, b: Float64Array, x: Float64Array, colour: number, j0: number, j1: number, k0: number, k1: number): void {
  const lv = op.level, nx = lv.n[0], ny = lv.n[1], { sy, sz, guard } = lv, inv = 1 / (2 * lv.dims);
  const { line, start, end } = regularRuns(op);
  for (let k = k0; k < k1; k++) {
    for (let j = j0; j < j1; j++) {
      const jk = k * ny + j, row = guard + jk * nx, q1 = line[jk + 1];
      // Node (i, j, k) has colour (i + j + k) mod 2; a run may start on either colour.
      const par = (colour + j + k) & 1;
      for (let q = line[jk]; q < q1; q++) {
        let n = start[q];
        if (((n - row) & 1) !== par) n++;
        const e = end[q];
        if (lv.dims === 2) {
          for (; n < e; n += 2) x[n] = inv * (b[n] + x[n - 1] + x[n + 1] + x[n - sy] + x[n + sy]);
        } else {
          for (; n < e; n += 2) x[n] = inv * (b[n] + x[n - 1] + x[n + 1] + x[n - sy] + x[n + sy] + x[n - sz] + x[n + sz]);
        }
      }
    }
  }
}

/** The cut rows of colour `colour` from row index q on, while their node lies below `end`; returns the next q. */
function relaxCutRows(op: LevelOperator, b: Float64Array, x: Float64Array, colour: number, q: number, end: number): number {
  const r = op.rows, node = r.node, m = node.length;
  if (q >= m || node[q] >= end) return q;
  const col = r.colour, dg = r.diag, lv = op.level, o0 = -1, o1 = 1, o2 = -lv.sy, o3 = lv.sy, o4 = -lv.sz, o5 = lv.sz;
  for (; q < m && node[q] < end; q++) {
    if (col[q] !== colour) continue;
    const n = node[q];
    x[n] = (b[n] + cutSum(r, q, x, o0, o1, o2, o3, o4, o5)) / dg[q];
  }
  return q;
}

/**
 * Two Gauss–Seidel half-sweeps, colour `first` (nodes with (i + j + k) mod 2 = first) then the
 * other, in one pass over memory: slab s (a grid line of a 2D level, a plane of a 3D one) gets the
 * first colour, then slab s − 1 the second. A node of the second colour in slab s − 1 needs the new
 * first-colour values of slabs s − 2 … s (all done), and a first-colour node of slab s the old
 * second-colour values of slabs s − 1 … s + 1 (none changed yet), so every node sees what it sees
 * in two separate half-sweeps and the result is the same to the bit; the vectors are read once
 * instead of twice. Cut rows (stored sorted by node) follow their slab.
 */
export function relaxPair(op: LevelOperator, b: Float64Array, x: Float64Array, first: number): void {
  const lv = op.level, three = lv.dims === 3, slabs = three ? lv.n[2] : lv.n[1], slab = three ? lv.sz : lv.sy, ny = lv.n[1];
  const second = 1 - first, uniform = lv.uniform;
  let qa = 0, qb = 0;
  for (let s = 0; s <= slabs; s++) {
    if (s < slabs) {
      if (uniform) { if (three) relaxUniform(op, b, x, first, 0, ny, s, s + 1); else relaxUniform(op, b, x, first, s, s + 1, 0, 1); }
      else if (three) relaxWeighted(op, b, x, first, 0, ny, s, s + 1); else relaxWeighted(op, b, x, first, s, s + 1, 0, 1);
      qa = relaxCutRows(op, b, x, first, qa, lv.guard + (s + 1) * slab);
    }
    if (s > 0) {
      const t = s - 1;
      if (uniform) { if (three) relaxUniform(op, b, x, second, 0, ny, t, t + 1); else relaxUniform(op, b, x, second, t, t + 1, 0, 1); }
      else if (three) relaxWeighted(op, b, x, second, 0, ny, t, t + 1); else relaxWeighted(op, b, x, second, t, t + 1, 0, 1);
      qb = relaxCutRows(op, b, x, second, qb, lv.guard + s * slab);
    }
  }
}

/** One Gauss–Seidel half-sweep over the nodes of colour (i + j + k) mod 2 = colour. */
export function relaxColour(op: LevelOperator, b: Float64Array, x: Float64Array, colour: number): void {
  const lv = op.level, ny = lv.n[1], nz = lv.n[2];
  if (lv.uniform) relaxUniform(op, b, x, colour, 0, ny, 0, nz); else relaxWeighted(op, b, x, colour, 0, ny, 0, nz);
  // Cut rows of this colour: their neighbours are all of the other colour, as for the regular ones.
  relaxCutRows(op, b, x, colour, 0, Infinity);
}

/** Coarse parents of fine index i along one axis: the coarse node(s) and weights of linear interpolation. */
function parents(i: number, coarsened: boolean, idx: Int32Array, w: Float64Array): number {
  if (!coarsened) { idx[0] = i; w[0] = 1; return 1; }
  if ((i & 1) === 0) { idx[0] = i >> 1; w[0] = 1; return 1; }
  idx[0] = i >> 1; idx[1] = (i >> 1) + 1; w[0] = 0.5; w[1] = 0.5; return 2;
}

/** Scratch of restrictResidual/prolongAdd: the (up to 4) coarse rows a fine row draws on, and a row. */
export class RowScratch {
  readonly jIdx = new Int32Array(2); readonly jW = new Float64Array(2);
  readonly kIdx = new Int32Array(2); readonly kW = new Float64Array(2);
  readonly base = new Int32Array(4); readonly w = new Float64Array(4);
  /** A fine row's residuals at offset 1, zero-padded on both sides; a coarse row's combination. */
  readonly res: Float64Array;
  readonly comb: Float64Array;
  constructor(maxRow: number) {
    this.res = new Float64Array(maxRow + 4);
    this.comb = new Float64Array(maxRow + 4);
  }
  rows(fj: number, fk: number, three: boolean, c: Level): number {
    const nj = parents(fj, true, this.jIdx, this.jW), nk = parents(fk, three, this.kIdx, this.kW);
    let q = 0;
    for (let a = 0; a < nk; a++) for (let b = 0; b < nj; b++) {
      this.base[q] = c.guard + (this.kIdx[a] * c.n[1] + this.jIdx[b]) * c.n[0];
      this.w[q++] = this.kW[a] * this.jW[b];
    }
    return q;
  }
}

function scatter(rc: Float64Array, s: RowScratch, nq: number, i: number, r: number): void {
  const base = s.base, wq = s.w, ic = i >> 1;
  if ((i & 1) === 0) for (let q = 0; q < nq; q++) rc[base[q] + ic] += wq[q] * r;
  else {
    const h = 0.5 * r;
    for (let q = 0; q < nq; q++) { rc[base[q] + ic] += wq[q] * h; rc[base[q] + ic + 1] += wq[q] * h; }
  }
}

/** The residuals of the regular rows of fine row (j, k) into res[1 + i] (0 at fixed and cut nodes). */
function rowResidual(op: LevelOperator, b: Float64Array, x: Float64Array, j: number, k: number, res: Float64Array, inv: number): void {
  const f = op.level, d = op.diag, nx = f.n[0], { sy, sz, guard } = f, row = guard + (k * f.n[1] + j) * nx;
  if (f.uniform) {
    const dd = 2 * f.dims, { line, start, end } = regularRuns(op), jk = k * f.n[1] + j, q1 = line[jk + 1], at = 1 - row;
    res.fill(0, 0, nx + 2);
    for (let q = line[jk]; q < q1; q++) {
      const e = end[q];
      if (f.dims === 2) {
        for (let n = start[q]; n < e; n++) res[at + n] = inv * (b[n] - dd * x[n] + x[n - 1] + x[n + 1] + x[n - sy] + x[n + sy]);
      } else {
        for (let n = start[q]; n < e; n++) res[at + n] = inv * (b[n] - dd * x[n] + x[n - 1] + x[n + 1] + x[n - sy] + x[n + sy] + x[n - sz] + x[n + sz]);
      }
    }
    return;
  }
  const m0 = f.m[0], em0 = f.em[0], ep0 = f.ep[0];
  const cx = f.m[1][j] * f.m[2][k], cym = f.em[1][j] * f.m[2][k], cyp = f.ep[1][j] * f.m[2][k], czm = f.m[1][j] * f.em[2][k], czp = f.m[1][j] * f.ep[2][k];
  for (let i = 0, n = row; i < nx; i++, n++) {
    const dn = d[n];
    res[i + 1] = dn <= 0 ? 0 : inv * (b[n] - dn * x[n] + cx * (em0[i] * x[n - 1] + ep0[i] * x[n + 1])
      + m0[i] * (cym * x[n - sy] + cyp * x[n + sy] + czm * x[n - sz] + czp * x[n + sz]));
  }
}

/**
 * rc = Pᵀ (b − A x) / scale, Pᵀ the transpose of linear interpolation, row by row (the fine
 * residual is never stored whole). `scale` = 2^(d−2) makes the rediscretised coarse operator match
 * Pᵀ A P (the weights of an integrated d-dimensional operator grow as h^(d−2)).
 */
export function restrictResidual(op: LevelOperator, b: Float64Array, x: Float64Array, cop: LevelOperator, rc: Float64Array, scale: number, s: RowScratch): void {
  const f = op.level, c = cop.level, [nx, ny, nz] = f.n, three = nz > 1, inv = 1 / scale, ncx = c.n[0], res = s.res, comb = s.comb;
  rc.fill(0);
  res.fill(0);
  for (let k = 0; k < nz; k++) {
    for (let j = 0; j < ny; j++) {
      rowResidual(op, b, x, j, k, res, inv);
      const nq = s.rows(j, k, three, c);
      // Coarse node ic gathers fine nodes 2ic (weight 1) and 2ic ± 1 (weight ½); res is padded.
      // The row restricted along x once, then added to each of the (up to 4) coarse rows.
      for (let ic = 0; ic < ncx; ic++) {
        const i = 2 * ic + 1;
        comb[ic] = res[i] + 0.5 * (res[i - 1] + res[i + 1]);
      }
      for (let q = 0; q < nq; q++) {
        const base = s.base[q], w = s.w[q];
        for (let ic = 0; ic < ncx; ic++) rc[base + ic] += w * comb[ic];
      }
    }
  }
  const r = op.rows, [o0, o1, o2, o3, o4, o5] = offsets(f), nxy = nx * ny, guard = f.guard;
  for (let q = 0; q < r.node.length; q++) {
    const n = r.node[q], id = n - guard, i = id % nx, j = ((id / nx) | 0) % ny, k = (id / nxy) | 0;
    const nq = s.rows(j, k, three, c);
    scatter(rc, s, nq, i, inv * (b[n] - r.diag[q] * x[n] + cutSum(r, q, x, o0, o1, o2, o3, o4, o5)));
  }
  const cd = cop.diag;
  for (let n = 0; n < rc.length; n++) if (cd[n] === 0) rc[n] = 0;
}

/** x += P ec at the free fine nodes: the coarse rows combined once per fine row, then along it. */
export function prolongAdd(op: LevelOperator, x: Float64Array, cop: LevelOperator, ec: Float64Array, s: RowScratch): void {
  const f = op.level, d = op.diag, c = cop.level, [nx, ny, nz] = f.n, three = nz > 1, ncx = c.n[0], comb = s.comb;
  const runs = f.uniform ? regularRuns(op) : undefined, cut = op.rows.node;
  let cq = 0;
  for (let k = 0; k < nz; k++) {
    for (let j = 0; j < ny; j++) {
      const row = f.guard + (k * ny + j) * nx;
      const nq = s.rows(j, k, three, c);
      for (let ic = 0; ic < ncx; ic++) comb[ic] = 0;
      for (let q = 0; q < nq; q++) {
        const base = s.base[q], w = s.w[q];
        for (let ic = 0; ic < ncx; ic++) comb[ic] += w * ec[base + ic];
      }
      if (runs !== undefined) {
        // Regular nodes by their runs, then this line's cut rows (stored in node order).
        const jk = k * ny + j, q1 = runs.line[jk + 1];
        for (let q = runs.line[jk]; q < q1; q++) {
          for (let n = runs.start[q], e = runs.end[q]; n < e; n++) {
            const i = n - row, ic = i >> 1;
            x[n] += (i & 1) === 0 ? comb[ic] : 0.5 * (comb[ic] + comb[ic + 1]);
          }
        }
        for (const lineEnd = row + nx; cq < cut.length && cut[cq] < lineEnd; cq++) {
          const n = cut[cq], i = n - row, ic = i >> 1;
          x[n] += (i & 1) === 0 ? comb[ic] : 0.5 * (comb[ic] + comb[ic + 1]);
        }
        continue;
      }
      for (let i = 0, n = row; i < nx; i++, n++) {
        if (d[n] === 0) continue;
        const ic = i >> 1;
        x[n] += (i & 1) === 0 ? comb[ic] : 0.5 * (comb[ic] + comb[ic + 1]);
      }
    }
  }
}

/** (A y) at each stored row, into out[q]. */
export function rowsApply(op: LevelOperator, y: Float64Array, out: Float64Array): void {
  const r = op.rows, [o0, o1, o2, o3, o4, o5] = offsets(op.level);
  for (let q = 0; q < r.node.length; q++) { const n = r.node[q]; out[q] = r.diag[q] * y[n] - cutSum(r, q, y, o0, o1, o2, o3, o4, o5); }
}

/** (A y) along fine row (j, k) into out[at + i]; stored rows from `rowValues` (rowsApply), 0 at fixed nodes. */
export function lineApply(op: LevelOperator, y: Float64Array, j: number, k: number, rowValues: Float64Array, out: Float64Array, at = 0): void {
  const f = op.level, d = op.diag, nx = f.n[0], { sy, sz, guard } = f, row = guard + (k * f.n[1] + j) * nx;
  if (f.uniform) {
    const dd = 2 * f.dims;
    if (f.dims === 2) {
      for (let i = 0, n = row; i < nx; i++, n++) { const dn = d[n]; out[at + i] = dn > 0 ? dd * y[n] - (y[n - 1] + y[n + 1] + y[n - sy] + y[n + sy]) : dn < 0 ? rowValues[-dn - 1] : 0; }
    } else {
      for (let i = 0, n = row; i < nx; i++, n++) { const dn = d[n]; out[at + i] = dn > 0 ? dd * y[n] - (y[n - 1] + y[n + 1] + y[n - sy] + y[n + sy] + y[n - sz] + y[n + sz]) : dn < 0 ? rowValues[-dn - 1] : 0; }
    }
    return;
  }
  const m0 = f.m[0], em0 = f.em[0], ep0 = f.ep[0];
  const cx = f.m[1][j] * f.m[2][k], cym = f.em[1][j] * f.m[2][k], cyp = f.ep[1][j] * f.m[2][k], czm = f.m[1][j] * f.em[2][k], czp = f.m[1][j] * f.ep[2][k];
  for (let i = 0, n = row; i < nx; i++, n++) {
    const dn = d[n];
    out[at + i] = dn > 0 ? dn * y[n] - cx * (em0[i] * y[n - 1] + ep0[i] * y[n + 1]) - m0[i] * (cym * y[n - sy] + cyp * y[n + sy] + czm * y[n - sz] + czp * y[n + sz])
      : dn < 0 ? rowValues[-dn - 1] : 0;
  }
}
