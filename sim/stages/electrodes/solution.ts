// The solved field of an electrodes stage as its kernel reads it: the unit solutions continued into
// the electrodes (sim/fields/extrapolate.ts) and summed by drive, Φ_dc = Σ dc_k φ_k (volts),
// Φ_rf = Σ rf_k φ_k (per volt of the stage RF drive), Φ_aux = Σ aux_k φ_k (per volt of the
// supplementary AC), stored interleaved in one interpolant (sim/fields/interpolate.ts) so that one
// set of weights per point serves all three (superposition of Laplace solutions). With it: the
// electrodes as point sets for the hit test, and a per-node mask of where that test is needed.
//
// A planar rod set of constant cross-section may be tracked in its fitted multipole series instead
// (`field_path: multipole`): each sum as Φ = Re Σ_n (c_n − i s_n) w^n, w = (x + iy)/r_ref, the
// coefficients of sim/fields/multipoles.ts, whose gradient ∂Φ/∂x − i ∂Φ/∂y = f'(w)/r_ref is exact
// (Φ is the real part of a holomorphic f: Cauchy–Riemann), evaluated with f' by Horner's rule
// (Knuth, TAOCP vol. 2, §4.6.4). No grid lookup; valid inside the circle the electrodes leave free.
//
// Solutions come from the field cache (sim/fields/cache.ts) by the geometry's key: the run's
// preparation (sim/engine/solved-fields.ts) solves or reads them in the main thread and registers
// them here; a worker thread, which has only the resolved scene, reads the same cache entry once.

import { cacheKey, cacheRoot, readCached } from '../../fields/cache.js';
import { DEFAULT_TOLERANCE } from '../../fields/solve.js';
import { ElectrodeSet } from '../../fields/electrode.js';
import { extendIntoElectrodes } from '../../fields/extrapolate.js';
import { GridInterpolant } from '../../fields/interpolate.js';
import { fitMultipoles } from '../../fields/multipoles.js';
import type { FieldProblem, FieldSolution, SolvedGrid } from '../../fields/problem.js';
import type { ElectrodesStage } from './stage.js';

/** Solver tolerance of the solutions tracked through (the default of `iontrail field`, so the cache is shared). */
export const FLIGHT_TOLERANCE = DEFAULT_TOLERANCE;

/** Orders of the multipole series a rod set is tracked in (`field_path: multipole`). */
export const SERIES_ORDERS = 20;

/**
 * Fitted coefficients below this share of the largest are taken as zero on the multipole path: the
 * fit leaves the orders a rod set's symmetry forbids at its round-off floor (about 1e-14 of A2 for
 * the QF-4R rods), far below the smallest allowed order it resolves (about 4e-10 for n = 18), so
 * dropping them changes the field by no more than the fit's own noise.
 */
const SERIES_FLOOR = 1e-12;

/** Chebyshev distance in nodes within which a node counts as near an electrode (the hit test runs there). */
const NEAR = 2;

export class SolvedField {
  readonly grid: SolvedGrid;
  readonly problem: FieldProblem;
  /** Interleaved [Φ_dc, Φ_rf, Φ_aux] (the ones present), 4 outputs each. */
  readonly interp: GridInterpolant;
  /** Output offsets of the rf and aux sums in an evaluation (−1 when absent). */
  readonly oRf: number;
  readonly oAux: number;
  readonly electrodes: ElectrodeSet[];
  /** Per node: 1 where an electrode node lies within NEAR nodes (grid layout, stored half). */
  readonly near: Uint8Array;
  /** Scratch for one evaluation. */
  readonly out = new Float64Array(12);
  /** Grid extent: transverse half width or radius, m (the grounded box edge). */
  readonly reach: number;
  readonly axial: boolean;
  readonly planar: boolean;
  /** The stage's exit plane, stage-local z, m (planar grids: any z, the field does not depend on it). */
  readonly zMax: number;

  /** Multipole path: per field and order n, Re and Im of c_n − i s_n (else empty); 1/r_ref. */
  readonly series: Float64Array;
  readonly invRef: number;
  readonly components: number;
  /**
   * Multipole path, gradient only: f'(w) = w^(n0−1) Σ_k b_k (w^d)^k with b_k = n a_n, n = n0 + k·d,
   * over the orders left after SERIES_FLOOR (a rod set's symmetry leaves every d-th: d = 4 for a
   * quadrupole's n = 2, 6, 10, …), so that a point costs a few complex products instead of a Horner
   * pass of all 20 orders per field. Per k: Re, Im of b_k for each field (dc, rf, aux).
   */
  private readonly deriv: Float64Array;
  private readonly dn0: number;
  private readonly dStep: number;
  private readonly dTerms: number;
  /**
   * Square of the transverse distance from the axis within which no electrode can be: the nearest
   * electrode node's distance less two cells (a surface lies within one cell of its nodes). The hit
   * test ends there without a lookup: most steps of a beam are near the axis.
   */
  private readonly clear2: number;
  /** Mirror planes, read per step by the hit test. */
  private readonly mx: boolean;
  private readonly my: boolean;
  private readonly mz: boolean;
  private readonly zMid: number;

  constructor(problem: FieldProblem, sol: FieldSolution, path: 'grid' | 'multipole' = 'grid') {
    this.problem = problem;
    this.grid = sol.grid;
    const g = sol.grid;
    const N = g.shape[0] * g.shape[1] * g.shape[2];
    const ext = sol.units.map((u) => extendIntoElectrodes(g, u, sol.inside));
    const pot = problem.electrodes.map((e) => e.potential);
    const hasRf = pot.some((p) => p.rf !== 0), hasAux = pot.some((p) => p.aux !== 0);
    const C = 1 + (hasRf ? 1 : 0) + (hasAux ? 1 : 0);
    this.oRf = hasRf ? 4 : -1;
    this.oAux = hasAux ? 4 * (C - 1) : -1;
    const v = new Float64Array(N * C);
    pot.forEach((p, k) => {
      const u = ext[k];
      for (let n = 0; n < N; n++) {
        v[n * C] += p.dc * u[n];
        if (hasRf) v[n * C + 1] += p.rf * u[n];
        if (hasAux) v[n * C + C - 1] += p.aux * u[n];
      }
    });
    this.interp = new GridInterpolant(g, v, C);
    this.components = C;
    this.series = new Float64Array(path === 'multipole' ? 2 * C * (SERIES_ORDERS + 1) : 0);
    this.invRef = 0;
    if (path === 'multipole') {
      const rRef = problem.grid.referenceRadius!;
      this.invRef = 1 / rRef;
      const sums: ('dc' | 'rf' | 'aux')[] = ['dc', ...(hasRf ? ['rf' as const] : []), ...(hasAux ? ['aux' as const] : [])];
      sums.forEach((which, c) => {
        const p = { ...problem, electrodes: problem.electrodes.map((e) => ({ ...e, potential: { dc: e.potential[which], rf: 0, aux: 0 } })) };
        for (const t of fitMultipoles(sol, p, { nMax: SERIES_ORDERS, referenceRadius: rRef })) {
          const o = 2 * (c * (SERIES_ORDERS + 1) + t.n);
          this.series[o] = t.cos_v; this.series[o + 1] = -t.sin_v;
        }
      });
    }
    const d = sparseDerivative(this.series, C, SERIES_ORDERS);
    this.deriv = d.b; this.dn0 = d.n0; this.dStep = d.step; this.dTerms = d.terms;
    this.electrodes = problem.electrodes.map((e) => new ElectrodeSet(e, g.symmetry));
    this.near = nearMask(g, sol.inside);
    this.clear2 = clearRadius(g, sol.inside) ** 2;
    this.axial = g.symmetry === 'axial';
    this.planar = g.symmetry === 'planar';
    this.reach = (this.axial ? problem.grid.radius : problem.grid.halfWidth) ?? 0;
    this.zMax = this.planar ? Infinity : problem.grid.length;
    this.mx = !this.axial && g.mirror.includes('x');
    this.my = !this.axial && g.mirror.includes('y');
    this.mz = !this.planar && g.mirror.includes('z');
    this.zMid = problem.grid.length / 2;
  }

  /**
   * ∇(Φ_dc + cr Φ_rf + ca Φ_aux) at a stage-local point into g[0..2] (the drives' superposition, so
   * the kernels need one gradient per stage point); false outside the grid sideways.
   */
  gradient(x: number, y: number, z: number, cr: number, ca: number, g: Float64Array): boolean {
    if (this.series.length === 0) {
      if (this.components === 2 && this.oRf > 0) return this.interp.gradientOfPair(x, y, z, cr, g);
      const o = this.out;
      if (!this.interp.evaluate(x, y, z, o)) return false;
      let gx = o[1], gy = o[2], gz = o[3];
      const r = this.oRf, a = this.oAux;
      if (r > 0) { gx += cr * o[r + 1]; gy += cr * o[r + 2]; gz += cr * o[r + 3]; }
      if (a > 0) { gx += ca * o[a + 1]; gy += ca * o[a + 2]; gz += ca * o[a + 3]; }
      g[0] = gx; g[1] = gy; g[2] = gz;
      return true;
    }
    if (!(Math.abs(x) <= this.reach && Math.abs(y) <= this.reach)) return false;
    const k = this.invRef, wr = x * k, wi = y * k;
    // u = w^d and p = w^(n0−1) by repeated products (d, n0 ≤ 20).
    let ur = wr, ui = wi;
    for (let e = 1; e < this.dStep; e++) { const t = ur * wr - ui * wi; ui = ur * wi + ui * wr; ur = t; }
    let pr = 1, pi = 0;
    for (let e = 1; e < this.dn0; e++) { const t = pr * wr - pi * wi; pi = pr * wi + pi * wr; pr = t; }
    const b = this.deriv, C = this.components, stride = 2 * C;
    const rf = this.oRf > 0 ? 2 : -1, aux = this.oAux > 0 ? 2 * (C - 1) : -1;
    let o = stride * (this.dTerms - 1);
    let fr = b[o], fi = b[o + 1];
    if (rf > 0) { fr += cr * b[o + rf]; fi += cr * b[o + rf + 1]; }
    if (aux > 0) { fr += ca * b[o + aux]; fi += ca * b[o + aux + 1]; }
    for (let t = this.dTerms - 2; t >= 0; t--) {
      o -= stride;
      let cr0 = b[o], ci0 = b[o + 1];
      if (rf > 0) { cr0 += cr * b[o + rf]; ci0 += cr * b[o + rf + 1]; }
      if (aux > 0) { cr0 += ca * b[o + aux]; ci0 += ca * b[o + aux + 1]; }
      const tr = fr * ur - fi * ui + cr0;
      fi = fr * ui + fi * ur + ci0; fr = tr;
    }
    // ∂Φ/∂x − i ∂Φ/∂y = f'(w)/r_ref.
    g[0] = (fr * pr - fi * pi) * k; g[1] = -(fr * pi + fi * pr) * k; g[2] = 0;
    return true;
  }

  /**
   * Every sum's φ and ∇φ at a stage-local point into out (the layout of GridInterpolant.evaluate);
   * false outside the grid sideways. The multipole path sums its series instead of the grid.
   */
  evaluate(x: number, y: number, z: number, out: Float64Array): boolean {
    if (this.series.length === 0) return this.interp.evaluate(x, y, z, out);
    if (!(Math.abs(x) <= this.reach && Math.abs(y) <= this.reach)) return false;
    const s = this.series, N = SERIES_ORDERS, k = this.invRef;
    const wr = x * k, wi = y * k;
    for (let c = 0; c < this.components; c++) {
      const b = 2 * c * (N + 1);
      // Horner for f(w) = Σ a_n wⁿ and f'(w).
      let fr = s[b + 2 * N], fi = s[b + 2 * N + 1], dr = 0, di = 0;
      for (let n = N - 1; n >= 0; n--) {
        const tr = dr * wr - di * wi + fr, ti = dr * wi + di * wr + fi;
        dr = tr; di = ti;
        const ur = fr * wr - fi * wi + s[b + 2 * n], ui = fr * wi + fi * wr + s[b + 2 * n + 1];
        fr = ur; fi = ui;
      }
      out[4 * c] = fr; out[4 * c + 1] = dr * k; out[4 * c + 2] = -di * k; out[4 * c + 3] = 0;
    }
    return true;
  }

  /** Index of the electrode containing a stage-local point (grid coordinates for its shapes), or −1. */
  electrodeAt(x: number, y: number, z: number): number {
    const t2 = x * x + y * y;
    if (t2 < this.clear2) return -1;
    const a = this.axial ? Math.sqrt(t2) : x, b = this.axial ? z : y, c = this.planar || this.axial ? 0 : z;
    if (!this.isNear(a, b, c)) return -1;
    for (let k = 0; k < this.electrodes.length; k++) if (this.electrodes[k].inside(a, b, c)) return k;
    return -1;
  }

  /** The nearest stored node's mask bit (mirror images folded into the stored half). */
  private isNear(a: number, b: number, c: number): boolean {
    const g = this.grid, h = g.spacing;
    if (this.mx) a = Math.abs(a);
    if (this.my) b = Math.abs(b);
    if (this.mz) {
      const zc = this.zMid;
      if (this.axial) b = zc + Math.abs(b - zc); else c = zc + Math.abs(c - zc);
    }
    const i = Math.round((a - g.origin[0]) / h), j = Math.round((b - g.origin[1]) / h);
    const k = this.planar || this.axial ? 0 : Math.round((c - g.origin[2]) / h);
    const [n0, n1, n2] = g.shape;
    // Beyond the stored grid: the caller's bounds test decides; the exact test is cheap enough there.
    if (i < 0 || j < 0 || k < 0 || i >= n0 || j >= n1 || k >= n2) return true;
    return this.near[i + n0 * (j + n1 * k)] === 1;
  }

  /**
   * The fraction θ ∈ [0, 1] of the segment P→Q (stage-local points, P outside, Q inside
   * electrode k) where it enters that electrode (sim/fields/electrode.ts entry).
   */
  entryFraction(k: number, px: number, py: number, pz: number, qx: number, qy: number, qz: number): number {
    const e = this.electrodes[k];
    if (this.axial) return e.entry(Math.sqrt(px * px + py * py), pz, 0, Math.sqrt(qx * qx + qy * qy), qz, 0);
    if (this.planar) return e.entry(px, py, 0, qx, qy, 0);
    return e.entry(px, py, pz, qx, qy, qz);
  }
}

/**
 * The derivative series of the multipole path (see SolvedField.deriv) from the fitted coefficients
 * (per field c and order n: Re, Im of a_n at 2(c(N+1) + n)): the orders above SERIES_FLOOR of
 * their field's largest in any field, their lowest n0 ≥ 1 and the gcd d of their spacings.
 */
function sparseDerivative(series: Float64Array, C: number, N: number): { b: Float64Array; n0: number; step: number; terms: number } {
  if (series.length === 0) return { b: new Float64Array(0), n0: 1, step: 1, terms: 0 };
  // The floor is taken per field: the dc sum is in volts, the rf and aux sums per volt of drive.
  const max = new Float64Array(C);
  for (let c = 0; c < C; c++) for (let n = 0; n <= N; n++) max[c] = Math.max(max[c], Math.hypot(series[2 * (c * (N + 1) + n)], series[2 * (c * (N + 1) + n) + 1]));
  const kept: number[] = [];
  for (let n = 1; n <= N; n++) {
    let big = false;
    for (let c = 0; c < C; c++) {
      const o = 2 * (c * (N + 1) + n);
      if (Math.hypot(series[o], series[o + 1]) > SERIES_FLOOR * max[c]) big = true;
    }
    if (big) kept.push(n);
  }
  if (kept.length === 0) return { b: new Float64Array(2 * C), n0: 1, step: 1, terms: 1 };
  const gcd = (a: number, b: number): number => (b === 0 ? a : gcd(b, a % b));
  const n0 = kept[0];
  const step = kept.slice(1).reduce((g, n) => gcd(g, n - n0), 0) || 1;
  const terms = (kept[kept.length - 1] - n0) / step + 1;
  const b = new Float64Array(2 * C * terms);
  for (let t = 0; t < terms; t++) {
    const n = n0 + t * step;
    if (!kept.includes(n)) continue;
    for (let c = 0; c < C; c++) {
      const o = 2 * (c * (N + 1) + n);
      b[2 * (t * C + c)] = n * series[o]; b[2 * (t * C + c) + 1] = n * series[o + 1];
    }
  }
  return { b, n0, step, terms };
}

/** See SolvedField.clear2: the electrode nodes' least distance from the axis, less two cells, m (≥ 0). */
function clearRadius(g: SolvedGrid, inside: Int16Array): number {
  const [n0, n1, n2] = g.shape, h = g.spacing, axial = g.symmetry === 'axial';
  let d2 = Infinity;
  for (let k = 0; k < n2; k++) for (let j = 0; j < n1; j++) for (let i = 0; i < n0; i++) {
    if (inside[i + n0 * (j + n1 * k)] < 0) continue;
    const a = g.origin[0] + i * h, b = axial ? 0 : g.origin[1] + j * h;
    d2 = Math.min(d2, a * a + b * b);
  }
  return Math.max(0, Math.sqrt(d2) - 2 * h);
}

function nearMask(g: SolvedGrid, inside: Int16Array): Uint8Array {
  const [n0, n1, n2] = g.shape;
  const out = new Uint8Array(n0 * n1 * n2);
  const r2 = n2 > 1 ? NEAR : 0;
  for (let k = 0; k < n2; k++) for (let j = 0; j < n1; j++) for (let i = 0; i < n0; i++) {
    if (inside[i + n0 * (j + n1 * k)] < 0) continue;
    for (let c = Math.max(0, k - r2); c <= Math.min(n2 - 1, k + r2); c++)
      for (let b = Math.max(0, j - NEAR); b <= Math.min(n1 - 1, j + NEAR); b++)
        for (let a = Math.max(0, i - NEAR); a <= Math.min(n0 - 1, i + NEAR); a++) out[a + n0 * (b + n1 * c)] = 1;
  }
  return out;
}

const byStage = new WeakMap<object, SolvedField>();
const byKey = new Map<string, SolvedField>();

/** The cache key of a stage's geometry, and the key of its prepared sums (geometry and volts). */
export function solutionKeys(problem: FieldProblem, path: 'grid' | 'multipole' = 'grid'): { geometry: string; prepared: string } {
  const geometry = cacheKey(problem, FLIGHT_TOLERANCE);
  const volts = problem.electrodes.map((e) => [e.potential.dc, e.potential.rf, e.potential.aux]);
  return { geometry, prepared: `${geometry}:${path}:${JSON.stringify(volts)}` };
}

/** Make a solved stage known to this thread (the run's preparation calls it after solving). */
export function registerSolution(problem: FieldProblem, sol: FieldSolution, path: 'grid' | 'multipole' = 'grid'): SolvedField {
  const { prepared } = solutionKeys(problem, path);
  let f = byKey.get(prepared);
  if (f === undefined) { f = new SolvedField(problem, sol, path); byKey.set(prepared, f); }
  return f;
}

/**
 * The solved field of a stage: registered in this thread, else read from the field cache. Throws
 * when neither has it (the run's preparation solves every stage before ions are tracked).
 */
export function solvedFieldOf(st: ElectrodesStage): SolvedField {
  const f = byStage.get(st);
  if (f !== undefined) return f;
  const path = st.path ?? 'grid';
  const { geometry, prepared } = solutionKeys(st.problem, path);
  let g = byKey.get(prepared);
  if (g === undefined) {
    const root = cacheRoot();
    const sol = readCached(root, geometry);
    if (sol === undefined) throw new Error(`the field of the electrodes stage at z = ${(st.zStart * 1e3).toPrecision(4)} mm is not solved (no entry ${geometry.slice(0, 12)} in the field cache ${root}); solve it first`);
    g = registerSolution(st.problem, sol, path);
  }
  byStage.set(st, g);
  return g;
}
