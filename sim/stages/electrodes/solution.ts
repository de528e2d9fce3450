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
    this.electrodes = problem.electrodes.map((e) => new ElectrodeSet(e, g.symmetry));
    this.near = nearMask(g, sol.inside);
    this.axial = g.symmetry === 'axial';
    this.planar = g.symmetry === 'planar';
    this.reach = (this.axial ? problem.grid.radius : problem.grid.halfWidth) ?? 0;
    this.zMax = this.planar ? Infinity : problem.grid.length;
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
    const a = this.axial ? Math.sqrt(x * x + y * y) : x, b = this.axial ? z : y, c = this.planar || this.axial ? 0 : z;
    if (!this.isNear(a, b, c)) return -1;
    for (let k = 0; k < this.electrodes.length; k++) if (this.electrodes[k].inside(a, b, c)) return k;
    return -1;
  }

  /** The nearest stored node's mask bit (mirror images folded into the stored half). */
  private isNear(a: number, b: number, c: number): boolean {
    const g = this.grid, h = g.spacing;
    const m = g.mirror;
    if (!this.axial && m.includes('x')) a = Math.abs(a);
    if (!this.axial && m.includes('y')) b = Math.abs(b);
    const zAxis = this.axial ? 1 : 2;
    if (m.includes('z') && !this.planar) {
      const zc = this.problem.grid.length / 2;
      if (zAxis === 1) b = zc + Math.abs(b - zc); else c = zc + Math.abs(c - zc);
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
