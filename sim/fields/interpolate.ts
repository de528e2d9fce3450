// Interpolation of a unit solution between grid nodes, with its analytic gradient: the tensor
// product of 1D cubic Hermite interpolation (bicubic for planar and axial grids, tricubic in 3D)
// whose node derivatives come from fourth-order finite differences. Cubic Hermite reproduces
// cubics when its node derivatives are exact, and the five-point differences are exact up to
// degree four (Fornberg, Math. Comp. 51 (1988), table 1; the one-sided rows at the ends), so the
// interpolant is exact for every polynomial of degree ≤ 3 in each coordinate. The node values and
// derivatives are shared by neighbouring cells, so value and gradient are continuous across cell
// faces (C¹), as in the tricubic scheme of Lekien & Marsden, Int. J. Numer. Meth. Eng. 63 (2005),
// whose cross derivatives here are the tensor products of the same differences.
// Each coordinate's interpolation is a 6-tap filter over the nodes i−2..i+3 of its cell; a call
// allocates nothing (scratch arrays live on the interpolant), which the ion kernels need.
// Several fields on one grid (the dc, rf and aux sums of a stage) may be stored interleaved, node
// by node (`components` > 1): the weights depend on the point only, so one evaluation serves all.

import type { SolvedGrid } from './problem.js';
import { Pair3Simd } from './simd/pair3.js';

/** Five-point derivative stencils ×12h: central, and the one-sided rows for nodes 0 and 1. */
const CENTRAL = [1, -8, 0, 8, -1];
const NODE0 = [-25, 48, -36, 16, -3];
const NODE1 = [-3, -10, 18, -6, 1];

interface Axis {
  n: number;
  origin: number;
  h: number;
  /** Per cell i (0..n−2): the window's base node, and the derivative stencils of nodes i and i+1 over it (stencil()). */
  cellBase: Int32Array;
  cellStencil: Float64Array;
  /** 1/h (the same bits as dividing each time). */
  inv: number;
  /** Even symmetry about the low end (a mirror plane there, or the axis r = 0 of an axial grid). */
  reflectLow: boolean;
  /** Even symmetry about the high end (a mirror plane at z = length/2 when the lower half is stored). */
  reflectHigh: boolean;
}

export class GridInterpolant {
  readonly grid: SolvedGrid;
  private readonly f: Float64Array;
  private readonly axes: Axis[];
  private readonly s0: number;
  private readonly s1: number;
  private readonly s2: number;
  /** Scratch: per axis the base node, value weights and derivative weights (per unit length). */
  private readonly base = new Int32Array(3);
  private W: Float64Array = new Float64Array(36);
  private readonly wv: Float64Array[] = [0, 1, 2].map((a) => this.W.subarray(12 * a, 12 * a + 6));
  private readonly wd: Float64Array[] = [0, 1, 2].map((a) => this.W.subarray(12 * a + 6, 12 * a + 12));
  /** Pairs: the SIMD form of pair2 and pair3 (made on first use; null where unavailable), whose memory holds the weights. */
  private simd: Pair3Simd | null | undefined;
  /** Scratch: node derivative stencil weights of the cell's two nodes. */
  private readonly sa = new Float64Array(6);
  private readonly sb = new Float64Array(6);
  private readonly mirrorX: boolean;
  private readonly mirrorY: boolean;
  private readonly mirrorZ: boolean;
  private readonly zPlane: number;
  /** Scratch of gradientOfPair (its fold sign and sums). */
  private readonly scratch = new Float64Array(4);
  /** Fields stored per node (interleaved); evaluate writes 4 numbers per field. */
  readonly components: number;

  /** simd false: pair3 stays scalar (for the check that both forms give the same bits). */
  constructor(grid: SolvedGrid, values: ArrayLike<number>, components = 1, simd = true) {
    this.grid = grid;
    if (!simd) this.simd = null;
    this.f = values instanceof Float64Array ? values : Float64Array.from(values);
    if (!(components >= 1 && components <= 3)) throw new Error(`1 to 3 interleaved fields, got ${components}`);
    this.components = components;
    const [n0, n1, n2] = grid.shape;
    if (values.length !== n0 * n1 * n2 * components) throw new Error(`the grid has ${n0 * n1 * n2} nodes × ${components} fields, the values ${values.length}`);
    const h = grid.spacing;
    const m = new Set(grid.mirror);
    const sym = grid.symmetry;
    this.mirrorX = sym !== 'axial' && m.has('x');
    this.mirrorY = sym !== 'axial' && m.has('y');
    this.mirrorZ = sym !== 'planar' && m.has('z');
    const zAxis = sym === 'axial' ? 1 : 2;
    const zn = grid.shape[zAxis];
    // Mirror at z: the stored half ends at the plane; the lower half starts at z = 0.
    const lowerHalf = Math.abs(grid.origin[zAxis]) < h / 2;
    this.zPlane = lowerHalf ? grid.origin[zAxis] + (zn - 1) * h : grid.origin[zAxis];
    const axis = (i: number, low: boolean, high: boolean): Axis => ({ n: grid.shape[i], origin: grid.origin[i], h, inv: 1 / h, reflectLow: low, reflectHigh: high, cellBase: new Int32Array(0), cellStencil: new Float64Array(0) });
    if (sym === 'axial') {
      this.axes = [axis(0, true, false), axis(1, this.mirrorZ && !lowerHalf, this.mirrorZ && lowerHalf), axis(2, false, false)];
    } else {
      this.axes = [axis(0, this.mirrorX, false), axis(1, this.mirrorY, false),
        axis(2, this.mirrorZ && !lowerHalf, this.mirrorZ && lowerHalf)];
    }
    for (let i = 0; i < (sym === 'none' ? 3 : 2); i++) {
      const a = this.axes[i];
      if (a.n < 6) throw new Error('interpolation needs at least 6 nodes along each axis');
      // The stencils depend on the cell only: computed once here, looked up per evaluation.
      a.cellBase = new Int32Array(a.n - 1);
      a.cellStencil = new Float64Array(12 * (a.n - 1));
      for (let c = 0; c < a.n - 1; c++) {
        let base = c - 2;
        if (base < 0) base = 0;
        if (base > a.n - 6) base = a.n - 6;
        a.cellBase[c] = base;
        this.stencil(a, c, base, this.sa);
        this.stencil(a, c + 1, base, this.sb);
        a.cellStencil.set(this.sa, 12 * c);
        a.cellStencil.set(this.sb, 12 * c + 6);
      }
    }
    this.s0 = 1;
    this.s1 = n0;
    this.s2 = n0 * n1;
  }

  /** Node derivative stencil (×h) of node `i` into `s` over the window base..base+5. */
  private stencil(a: Axis, i: number, base: number, s: Float64Array): void {
    s.fill(0);
    const n = a.n;
    if ((i >= 2 || a.reflectLow) && (i <= n - 3 || a.reflectHigh)) {
      for (let k = 0; k < 5; k++) {
        let j = i - 2 + k;
        // Even reflection maps a node beyond a symmetric end back inside.
        if (j < 0) j = -j;
        else if (j > n - 1) j = 2 * (n - 1) - j;
        s[j - base] += CENTRAL[k] / 12;
      }
    } else if (i <= 1) {
      const row = i === 0 ? NODE0 : NODE1;
      for (let k = 0; k < 5; k++) s[k - base] += row[k] / 12;
    } else {
      const row = i === n - 1 ? NODE0 : NODE1;
      for (let k = 0; k < 5; k++) s[n - 1 - k - base] -= row[k] / 12;
    }
  }

  /** Fills the weights of axis `ai` at coordinate c; false when c is outside the axis. */
  private weights(ai: number, c: number): boolean {
    const a = this.axes[ai];
    const u = (c - a.origin) / a.h;
    if (!(u >= -1e-9 && u <= a.n - 1 + 1e-9)) return false;
    let i = Math.floor(u);
    if (i > a.n - 2) i = a.n - 2;
    if (i < 0) i = 0;
    const t = u - i;
    // With a symmetric end the window may reach past it (reflected back inside by stencil()).
    const base = a.cellBase[i];
    this.base[ai] = base;
    const st = a.cellStencil, o = 12 * i;
    // Cubic Hermite basis on [0, 1] and its t-derivatives.
    const t2 = t * t, t3 = t2 * t;
    const h00 = 2 * t3 - 3 * t2 + 1, h10 = t3 - 2 * t2 + t, h01 = -2 * t3 + 3 * t2, h11 = t3 - t2;
    const d00 = 6 * t2 - 6 * t, d10 = 3 * t2 - 4 * t + 1, d01 = -6 * t2 + 6 * t, d11 = 3 * t2 - 2 * t;
    // All weights in one array W (axis ai: values at 12ai, derivatives at 12ai + 6), the same
    // memory as wv[ai] and wd[ai]: one monomorphic store target per call.
    const W = this.W, v = 12 * ai, d = v + 6;
    const inv = a.inv;
    const s0 = st[o], s1 = st[o + 1], s2 = st[o + 2], s3 = st[o + 3], s4 = st[o + 4], s5 = st[o + 5];
    const r0 = st[o + 6], r1 = st[o + 7], r2 = st[o + 8], r3 = st[o + 9], r4 = st[o + 10], r5 = st[o + 11];
    W[v] = h10 * s0 + h11 * r0; W[v + 1] = h10 * s1 + h11 * r1; W[v + 2] = h10 * s2 + h11 * r2;
    W[v + 3] = h10 * s3 + h11 * r3; W[v + 4] = h10 * s4 + h11 * r4; W[v + 5] = h10 * s5 + h11 * r5;
    W[d] = (d10 * s0 + d11 * r0) * inv; W[d + 1] = (d10 * s1 + d11 * r1) * inv; W[d + 2] = (d10 * s2 + d11 * r2) * inv;
    W[d + 3] = (d10 * s3 + d11 * r3) * inv; W[d + 4] = (d10 * s4 + d11 * r4) * inv; W[d + 5] = (d10 * s5 + d11 * r5) * inv;
    W[v + i - base] += h00; W[v + i + 1 - base] += h01;
    W[d + i - base] += d00 * inv; W[d + i + 1 - base] += d01 * inv;
    return true;
  }

  /**
   * φ and ∇φ at a stage-local point (planar: z is ignored; axial: r = hypot(x, y)) into
   * out[0] = φ, out[1..3] = ∂φ/∂x, ∂φ/∂y, ∂φ/∂z (field c of an interleaved set at out[4c..4c+3]).
   * False (out untouched) outside the grid.
   */
  evaluate(x: number, y: number, z: number, out: Float64Array): boolean {
    const sym = this.grid.symmetry;
    if (sym === 'axial') return this.evaluateAxial(x, y, z, out);
    let sx = 1, sy = 1, sz = 1;
    if (this.mirrorX && x < 0) { x = -x; sx = -1; }
    if (this.mirrorY && y < 0) { y = -y; sy = -1; }
    if (sym === 'none' && this.mirrorZ) z = this.foldZ(z, out);
    if (sym === 'none' && this.mirrorZ) sz = out[3];
    if (!this.weights(0, x) || !this.weights(1, y)) return false;
    const C = this.components;
    if (sym === 'planar') {
      if (C === 1) this.sum2(out); else this.sum2n(out);
      for (let c = 0; c < 4 * C; c += 4) { out[c + 1] *= sx; out[c + 2] *= sy; out[c + 3] = 0; }
      return true;
    }
    if (!this.weights(2, z)) return false;
    if (C === 1) this.sum3(out); else if (C === 2) this.sum3two(out); else this.sum3n(out);
    for (let c = 0; c < 4 * C; c += 4) { out[c + 1] *= sx; out[c + 2] *= sy; out[c + 3] *= sz; }
    return true;
  }

  /**
   * ∇(φ_0 + cr φ_1) at a stage-local point into g[0..2], for a pair of interleaved fields (a
   * stage's dc and rf sums): the two node values are combined first, so one 6×6(×6) pass with
   * three sums (∂x, ∂y and, in 3D, the value for ∂z) serves the superposition — three products
   * a node instead of four and half the partial sums of evaluate(). The ion kernels need only this
   * gradient. False outside the grid (g untouched). Other field counts: evaluate() and combine.
   */
  gradientOfPair(x: number, y: number, z: number, cr: number, g: Float64Array): boolean {
    const sym = this.grid.symmetry;
    const o = this.scratch;
    if (sym === 'axial') {
      const r = Math.sqrt(x * x + y * y);
      let sz = 1;
      if (this.mirrorZ) { z = this.foldZ(z, o); sz = o[3]; }
      if (this.simd === undefined) this.useSimd();
      if (!this.weights(0, r) || !this.weights(1, z)) return false;
      this.pair2(cr, o);
      const ir = r > 0 ? 1 / r : 0;
      const c = o[0] * ir;
      g[0] = c * x; g[1] = c * y; g[2] = o[1] * sz;
      return true;
    }
    let sx = 1, sy = 1, sz = 1;
    if (this.mirrorX && x < 0) { x = -x; sx = -1; }
    if (this.mirrorY && y < 0) { y = -y; sy = -1; }
    if (sym === 'planar') {
      if (this.simd === undefined) this.useSimd();
      if (!this.weights(0, x) || !this.weights(1, y)) return false;
      this.pair2(cr, o);
      g[0] = sx * o[0]; g[1] = sy * o[1]; g[2] = 0;
      return true;
    }
    if (sym === 'none' && this.mirrorZ) { z = this.foldZ(z, o); sz = o[3]; }
    if (this.simd === undefined) this.useSimd();
    if (!this.weights(0, x) || !this.weights(1, y) || !this.weights(2, z)) return false;
    const k = this.simd;
    if (k) {
      k.gradient(this.base[0], this.base[1], this.base[2], this.s1, this.s2, cr);
      const r = k.result;
      g[0] = sx * r[0]; g[1] = sy * r[1]; g[2] = sz * r[2];
      return true;
    }
    this.pair3(cr, o);
    g[0] = sx * o[0]; g[1] = sy * o[1]; g[2] = sz * o[2];
    return true;
  }

  /** Moves the weights into a SIMD instance's memory, where pair3's SIMD form reads them. */
  private useSimd(): void {
    const [n0, n1, n2] = this.grid.shape;
    this.simd = this.components === 2 ? Pair3Simd.create(this.f, n0, n1, n2) : null;
    if (this.simd) {
      this.W = this.simd.weights;
      for (let a = 0; a < 3; a++) { this.wv[a] = this.W.subarray(12 * a, 12 * a + 6); this.wd[a] = this.W.subarray(12 * a + 6, 12 * a + 12); }
    }
  }

  /** Bicubic gradient of φ_0 + cr φ_1 (two interleaved fields) into out[0..1]. */
  private pair2(cr: number, out: Float64Array): void {
    const k = this.simd;
    if (k) {
      k.gradient2(this.base[0], this.base[1], this.s1, cr);
      out[0] = k.result[0]; out[1] = k.result[1];
      return;
    }
    const f = this.f, b0 = this.base[0], b1 = this.base[1], s1 = this.s1;
    const v0 = this.wv[0], d0 = this.wd[0], v1 = this.wv[1], d1 = this.wd[1];
    const w0 = v0[0], w1 = v0[1], w2 = v0[2], w3 = v0[3], w4 = v0[4], w5 = v0[5];
    const e0 = d0[0], e1 = d0[1], e2 = d0[2], e3 = d0[3], e4 = d0[4], e5 = d0[5];
    let gx = 0, gy = 0;
    for (let j = 0; j < 6; j++) {
      const q = 2 * ((b1 + j) * s1 + b0);
      const n0 = f[q] + cr * f[q + 1], n1 = f[q + 2] + cr * f[q + 3], n2 = f[q + 4] + cr * f[q + 5];
      const n3 = f[q + 6] + cr * f[q + 7], n4 = f[q + 8] + cr * f[q + 9], n5 = f[q + 10] + cr * f[q + 11];
      // Even and odd taps summed apart, as the lanes of the SIMD form (the same bits).
      const a = (w0 * n0 + w2 * n2 + w4 * n4) + (w1 * n1 + w3 * n3 + w5 * n5);
      const c = (e0 * n0 + e2 * n2 + e4 * n4) + (e1 * n1 + e3 * n3 + e5 * n5);
      gx += v1[j] * c; gy += d1[j] * a;
    }
    out[0] = gx; out[1] = gy;
  }

  /**
   * Tricubic gradient of φ_0 + cr φ_1 (two interleaved fields) into out[0..2]: per z plane the six
   * rows of pair2, each row a fixed stride on from the last, the x weights in locals.
   */
  private pair3(cr: number, out: Float64Array): void {
    const f = this.f, b0 = this.base[0], b1 = this.base[1], b2 = this.base[2];
    const s1 = 2 * this.s1, s2 = 2 * this.s2;
    const v0 = this.wv[0], d0 = this.wd[0], v1 = this.wv[1], d1 = this.wd[1], v2 = this.wv[2], d2 = this.wd[2];
    const w0 = v0[0], w1 = v0[1], w2 = v0[2], w3 = v0[3], w4 = v0[4], w5 = v0[5];
    const e0 = d0[0], e1 = d0[1], e2 = d0[2], e3 = d0[3], e4 = d0[4], e5 = d0[5];
    let gx = 0, gy = 0, gz = 0;
    let p = b2 * s2 + b1 * s1 + 2 * b0;
    for (let k = 0; k < 6; k++, p += s2) {
      let pv = 0, px = 0, py = 0, q = p;
      for (let j = 0; j < 6; j++, q += s1) {
        const n0 = f[q] + cr * f[q + 1], n1 = f[q + 2] + cr * f[q + 3], n2 = f[q + 4] + cr * f[q + 5];
        const n3 = f[q + 6] + cr * f[q + 7], n4 = f[q + 8] + cr * f[q + 9], n5 = f[q + 10] + cr * f[q + 11];
        // Even and odd taps summed apart, as the lanes of the SIMD form (the same bits).
        const a = (w0 * n0 + w2 * n2 + w4 * n4) + (w1 * n1 + w3 * n3 + w5 * n5);
        const c = (e0 * n0 + e2 * n2 + e4 * n4) + (e1 * n1 + e3 * n3 + e5 * n5);
        const wv = v1[j];
        pv += wv * a; px += wv * c; py += d1[j] * a;
      }
      const wv = v2[k];
      gx += wv * px; gy += wv * py; gz += d2[k] * pv;
    }
    out[0] = gx; out[1] = gy; out[2] = gz;
  }

  /** z folded into the stored half; the sign of ∂/∂z it implies goes to out[3]. */
  private foldZ(z: number, out: Float64Array): number {
    const a = this.axes[this.grid.symmetry === 'axial' ? 1 : 2];
    const storedAbove = a.reflectLow;
    const p = this.zPlane;
    if ((storedAbove && z < p) || (!storedAbove && z > p)) { out[3] = -1; return 2 * p - z; }
    out[3] = 1;
    return z;
  }

  private evaluateAxial(x: number, y: number, z: number, out: Float64Array): boolean {
    const r = Math.sqrt(x * x + y * y);
    let sz = 1;
    if (this.mirrorZ) { z = this.foldZ(z, out); sz = out[3]; }
    if (!this.weights(0, r) || !this.weights(1, z)) return false;
    const C = this.components;
    if (C === 1) this.sum2(out); else this.sum2n(out);
    // ∂φ/∂r vanishes on the axis (even in r), so x/r may be taken as 0 there.
    const ir = r > 0 ? 1 / r : 0;
    for (let o = 0; o < 4 * C; o += 4) {
      const c = out[o + 1] * ir, dz = out[o + 2];
      out[o + 1] = c * x; out[o + 2] = c * y; out[o + 3] = dz * sz;
    }
    return true;
  }

  private sum2(out: Float64Array): void {
    const f = this.f, b0 = this.base[0], b1 = this.base[1];
    const v0 = this.wv[0], d0 = this.wd[0], v1 = this.wv[1], d1 = this.wd[1];
    let p = 0, g0 = 0, g1 = 0;
    for (let j = 0; j < 6; j++) {
      const row = (b1 + j) * this.s1 + b0;
      let rv = 0, rd = 0;
      for (let i = 0; i < 6; i++) { const fi = f[row + i]; rv += v0[i] * fi; rd += d0[i] * fi; }
      p += v1[j] * rv; g0 += v1[j] * rd; g1 += d1[j] * rv;
    }
    out[0] = p; out[1] = g0; out[2] = g1;
  }

  private sum3(out: Float64Array): void {
    const f = this.f, b0 = this.base[0], b1 = this.base[1], b2 = this.base[2];
    const v0 = this.wv[0], d0 = this.wd[0], v1 = this.wv[1], d1 = this.wd[1], v2 = this.wv[2], d2 = this.wd[2];
    let p = 0, g0 = 0, g1 = 0, g2 = 0;
    for (let k = 0; k < 6; k++) {
      let pv = 0, px = 0, py = 0;
      for (let j = 0; j < 6; j++) {
        const row = (b2 + k) * this.s2 + (b1 + j) * this.s1 + b0 * this.s0;
        let rv = 0, rd = 0;
        for (let i = 0; i < 6; i++) { const fi = f[row + i]; rv += v0[i] * fi; rd += d0[i] * fi; }
        pv += v1[j] * rv; px += v1[j] * rd; py += d1[j] * rv;
      }
      p += v2[k] * pv; g0 += v2[k] * px; g1 += v2[k] * py; g2 += d2[k] * pv;
    }
    out[0] = p; out[1] = g0; out[2] = g1; out[3] = g2;
  }

  /**
   * sum2 for two or three interleaved fields, in one pass over the window: each node's values are
   * read together and accumulated in locals (a loop per field read the window once per field and
   * kept nothing in registers). out[4c..4c+2] = φ_c, ∂_0 φ_c, ∂_1 φ_c.
   */
  private sum2n(out: Float64Array): void {
    const f = this.f, C = this.components, three = C === 3, b0 = this.base[0], b1 = this.base[1], s1 = this.s1;
    const v0 = this.wv[0], d0 = this.wd[0], v1 = this.wv[1], d1 = this.wd[1];
    let p0 = 0, x0 = 0, y0 = 0, p1 = 0, x1 = 0, y1 = 0, p2 = 0, x2 = 0, y2 = 0;
    for (let j = 0; j < 6; j++) {
      let q = ((b1 + j) * s1 + b0) * C;
      let a0 = 0, e0 = 0, a1 = 0, e1 = 0, a2 = 0, e2 = 0;
      for (let i = 0; i < 6; i++, q += C) {
        const wv = v0[i], wd = d0[i];
        const g0 = f[q], g1 = f[q + 1];
        a0 += wv * g0; e0 += wd * g0; a1 += wv * g1; e1 += wd * g1;
        if (three) { const g2 = f[q + 2]; a2 += wv * g2; e2 += wd * g2; }
      }
      const wv = v1[j], wd = d1[j];
      p0 += wv * a0; x0 += wv * e0; y0 += wd * a0;
      p1 += wv * a1; x1 += wv * e1; y1 += wd * a1;
      p2 += wv * a2; x2 += wv * e2; y2 += wd * a2;
    }
    out[0] = p0; out[1] = x0; out[2] = y0;
    out[4] = p1; out[5] = x1; out[6] = y1;
    if (three) { out[8] = p2; out[9] = x2; out[10] = y2; }
  }

  /**
   * sum3n for exactly two fields (a stage's dc and rf sums, the common case), the x window written
   * out with its weights in locals: the same additions in the same order as sum3n (the same bits),
   * without a typed-array load of a weight per node or a test for a third field in the inner loop.
   */
  private sum3two(out: Float64Array): void {
    const f = this.f, b0 = this.base[0], b1 = this.base[1], b2 = this.base[2];
    const s1 = this.s1, s2 = this.s2;
    const v0 = this.wv[0], d0 = this.wd[0], v1 = this.wv[1], d1 = this.wd[1], v2 = this.wv[2], d2 = this.wd[2];
    const w0 = v0[0], w1 = v0[1], w2 = v0[2], w3 = v0[3], w4 = v0[4], w5 = v0[5];
    const e0 = d0[0], e1 = d0[1], e2 = d0[2], e3 = d0[3], e4 = d0[4], e5 = d0[5];
    let p0 = 0, x0 = 0, y0 = 0, z0 = 0, p1 = 0, x1 = 0, y1 = 0, z1 = 0;
    for (let k = 0; k < 6; k++) {
      let pv0 = 0, px0 = 0, py0 = 0, pv1 = 0, px1 = 0, py1 = 0;
      const plane = (b2 + k) * s2 + b0;
      for (let j = 0; j < 6; j++) {
        const q = 2 * (plane + (b1 + j) * s1);
        const f0 = f[q], g0 = f[q + 1], f1 = f[q + 2], g1 = f[q + 3], f2 = f[q + 4], g2 = f[q + 5];
        const f3 = f[q + 6], g3 = f[q + 7], f4 = f[q + 8], g4 = f[q + 9], f5 = f[q + 10], g5 = f[q + 11];
        const a0 = w0 * f0 + w1 * f1 + w2 * f2 + w3 * f3 + w4 * f4 + w5 * f5;
        const c0 = e0 * f0 + e1 * f1 + e2 * f2 + e3 * f3 + e4 * f4 + e5 * f5;
        const a1 = w0 * g0 + w1 * g1 + w2 * g2 + w3 * g3 + w4 * g4 + w5 * g5;
        const c1 = e0 * g0 + e1 * g1 + e2 * g2 + e3 * g3 + e4 * g4 + e5 * g5;
        const wv = v1[j], wd = d1[j];
        pv0 += wv * a0; px0 += wv * c0; py0 += wd * a0;
        pv1 += wv * a1; px1 += wv * c1; py1 += wd * a1;
      }
      const wv = v2[k], wd = d2[k];
      p0 += wv * pv0; x0 += wv * px0; y0 += wv * py0; z0 += wd * pv0;
      p1 += wv * pv1; x1 += wv * px1; y1 += wv * py1; z1 += wd * pv1;
    }
    out[0] = p0; out[1] = x0; out[2] = y0; out[3] = z0;
    out[4] = p1; out[5] = x1; out[6] = y1; out[7] = z1;
  }

  /** sum3 for two or three interleaved fields, one pass (as sum2n). */
  private sum3n(out: Float64Array): void {
    const f = this.f, C = this.components, three = C === 3, b0 = this.base[0], b1 = this.base[1], b2 = this.base[2];
    const s1 = this.s1, s2 = this.s2;
    const v0 = this.wv[0], d0 = this.wd[0], v1 = this.wv[1], d1 = this.wd[1], v2 = this.wv[2], d2 = this.wd[2];
    let p0 = 0, x0 = 0, y0 = 0, z0 = 0, p1 = 0, x1 = 0, y1 = 0, z1 = 0, p2 = 0, x2 = 0, y2 = 0, z2 = 0;
    for (let k = 0; k < 6; k++) {
      let pv0 = 0, px0 = 0, py0 = 0, pv1 = 0, px1 = 0, py1 = 0, pv2 = 0, px2 = 0, py2 = 0;
      for (let j = 0; j < 6; j++) {
        let q = ((b2 + k) * s2 + (b1 + j) * s1 + b0) * C;
        let a0 = 0, e0 = 0, a1 = 0, e1 = 0, a2 = 0, e2 = 0;
        for (let i = 0; i < 6; i++, q += C) {
          const wv = v0[i], wd = d0[i];
          const g0 = f[q], g1 = f[q + 1];
          a0 += wv * g0; e0 += wd * g0; a1 += wv * g1; e1 += wd * g1;
          if (three) { const g2 = f[q + 2]; a2 += wv * g2; e2 += wd * g2; }
        }
        const wv = v1[j], wd = d1[j];
        pv0 += wv * a0; px0 += wv * e0; py0 += wd * a0;
        pv1 += wv * a1; px1 += wv * e1; py1 += wd * a1;
        pv2 += wv * a2; px2 += wv * e2; py2 += wd * a2;
      }
      const wv = v2[k], wd = d2[k];
      p0 += wv * pv0; x0 += wv * px0; y0 += wv * py0; z0 += wd * pv0;
      p1 += wv * pv1; x1 += wv * px1; y1 += wv * py1; z1 += wd * pv1;
      p2 += wv * pv2; x2 += wv * px2; y2 += wv * py2; z2 += wd * pv2;
    }
    out[0] = p0; out[1] = x0; out[2] = y0; out[3] = z0;
    out[4] = p1; out[5] = x1; out[6] = y1; out[7] = z1;
    if (three) { out[8] = p2; out[9] = x2; out[10] = y2; out[11] = z2; }
  }
}
