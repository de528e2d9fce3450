// The batch pass of the transfer-matrix path (linear-path.ts): the fates of a run of ions of
// one population that start inside one ideal quadrupole stage followed only by open drifts, in
// tight loops over the run. It decides fates only (no hit times) and uses the same checks as
// the direct kernel: the step ends t_entry + n·T/M inside the rods and the exit sample, loss
// when x² + y² ≥ r0². Any sample at or past r0 decides a loss (the direct kernel stops at that
// check or an earlier one), so the pass may look at the checks in any order. Ions it cannot
// decide are left to the per-ion tiers of linear-path.ts (done[j] stays 0).
//
// Growing runs (an axis unstable, Magnus & Winkler, Hill's Equation, 1966, §1.2):
//  1. one sample per growing axis after the last whole period in the rods, from the spectral
//     rows at the ion's phase ψ (transfer-matrix.ts, SpectralRows) with their interpolation
//     bound: no F(ψ) is formed for the ions it loses, which are nearly all;
//  2. the same sample exactly, X = F(ψ)·M0^K·c (power table);
//  3. the quiet periods by the eigen-bound, then the period-end samples one period at a time.
// Stable runs (both axes stable; Courant & Snyder, Ann. Phys. 3, 1, 1958):
//  1. the all-time envelope I·(Wmax + wMargin) per axis keeps x² + y² below r0²: it passes
//     (I first from the interpolated form at ψ with its bound, TwissRows; then exactly);
//  2. else the candidate checks (grid envelope I·W(θ_m) ≥ r0²) largest first, each over every
//     period, after the arc its Floquet phase sweeps in the rods has been tested; then the exit.
// Each function is kept small so that V8 optimizes it quickly and keeps it optimized.

import { Fate } from '../core/batch.js';
import type { QuadrupoleStage, Stage } from '../scene/types.js';
import { ENVELOPE_MARGIN, powerApply, powers, spectralRows, twissRows, type PeriodTable, type SpectralRows, type TwissRows } from './transfer-matrix.js';

/** Start states of the ions (StartStates in linear-path.ts), as the pass reads them. */
export interface StartArrays {
  readonly x: Float64Array; readonly y: Float64Array; readonly z: Float64Array;
  readonly vx: Float64Array; readonly vy: Float64Array; readonly vz: Float64Array;
  readonly tau: Float64Array;
}

/**
 * One run: ions [j0, j1) of the batch (global index start + j) in stage s0 of `stages`. One or
 * both tables are given; complete() supplies the other when the pass needs it.
 */
export interface Run {
  tx: PeriodTable | null;
  ty: PeriodTable | null;
  complete: (run: Run) => void;
  stage: QuadrupoleStage;
  s0: number;
  stages: readonly Stage[];
  /** Velocity factor of the reused start draws, √(m_drawn/m). */
  sc: number;
  maxTime: number;
  /** Loss radius², in units of r0². */
  R2: number;
  /** Entrance and exit plates' hole radius², detector radius², m² (the loss scale applied). */
  entry2: number;
  exit2: number;
  detector2: number;
  /** Whether a passing ion's fate needs its exit state (a plate narrower than r0, a finite detector). */
  exitState: boolean;
}

/** Tallies for the benchmark's breakdown. */
export interface BatchCounts { envelopeCleared: number; periodLoops: number }

const TWO_PI = 2 * Math.PI;

/** Scratch shared by every run (a run completes before the next starts), grown on demand. */
const S = {
  cand: new Int32Array(0), env: new Float64Array(0), rot: new Float64Array(0),
  dx1: new Float64Array(0), dx2: new Float64Array(0), dy1: new Float64Array(0), dy2: new Float64Array(0),
  /** Per ion: F11, F12 (x), G11, G12 (y), cx1, cx2, cy1, cy2 (entry()). */
  entry: new Float64Array(8),
  /**
   * Arguments of the per-ion helpers that are not inlined: doubles passed as call arguments
   * are boxed (a heap number each), which at millions of ions makes garbage; a typed array
   * does not. entry(): e, X0, P0, Y0, Q0. stableScan(), stableExit(): e, cx1, cx2, cy1, cy2,
   * ix, iy, θ_end.
   */
  arg: new Float64Array(8),
  v: new Float64Array(2),
  /**
   * The exit state of the last stableExit() call, in units of r0 and r0·Ω: X, PX, Y, PY; then
   * beyondRods()' arguments vz and tExit (passed here, not boxed).
   */
  out: new Float64Array(6),
};

/** Decides what it can of one run; see the file head. */
export function batchRun(run: Run, st: StartArrays, start: number, j0: number, j1: number, fate: Int8Array, done: Uint8Array, counts: BatchCounts): void {
  const given = run.tx ?? run.ty;
  if (given === null || given.stable) run.complete(run);
  const tx = run.tx, ty = run.ty;
  if (tx !== null && ty !== null && tx.stable && ty.stable) stableRun(run, tx, ty, st, start, j0, j1, fate, done, counts);
  else growingRun(run, st, start, j0, j1, fate, done, counts);
}

/** The ion's RF phase at entry, in [0, 2π). */
function phaseAt(omega: number, tau: number, phase: number): number {
  const th0 = omega * tau + phase;
  let psi = th0 - TWO_PI * Math.floor(th0 / TWO_PI);
  if (psi >= TWO_PI) psi -= TWO_PI;
  return psi;
}

/**
 * F(ψ) (first rows) and c = F(ψ)⁻¹·w per axis into S.entry, ψ = θ_i0 + e: fAtGrid() for both
 * tables (one RK4 step of e on both columns; smallAngle() for cos, sin of e and e/2), then the
 * adjugate over det (det F = 1 up to rounding). Inputs in S.arg.
 */
function entry(tx: PeriodTable, ty: PeriodTable, i0: number): void {
  const a = S.arg, e = a[0], X0 = a[1], P0 = a[2], Y0 = a[3], Q0 = a[4];
  const e2 = e * e, hh = 0.5 * e, h2 = hh * hh, e6 = e / 6, eh = 0.5 * e;
  const ce = 1 - 0.5 * e2 * (1 - e2 / 12), se = e * (1 - (e2 / 6) * (1 - e2 / 20));
  const ch = 1 - 0.5 * h2 * (1 - h2 / 12), sh = hh * (1 - (h2 / 6) * (1 - h2 / 20));
  const c = tx.cos[i0], s = tx.sin[i0];
  const k1 = c * ch - s * sh, k2 = c * ce - s * se;
  const out = S.entry;
  for (let axis = 0; axis < 2; axis++) {
    const t = axis === 0 ? tx : ty;
    const g0 = t.w0 + t.w1 * c, g1 = t.w0 + t.w1 * k1, g2 = t.w0 + t.w1 * k2;
    let u = t.f11[i0], p = t.f21[i0];
    let a1 = -g0 * u, u2 = u + eh * p, p2 = p + eh * a1, a2 = -g1 * u2, u3 = u + eh * p2, p3 = p + eh * a2, a3 = -g1 * u3, u4 = u + e * p3, p4 = p + e * a3, a4 = -g2 * u4;
    const A11 = u + e6 * (p + 2 * p2 + 2 * p3 + p4), A21 = p + e6 * (a1 + 2 * a2 + 2 * a3 + a4);
    u = t.f12[i0]; p = t.f22[i0];
    a1 = -g0 * u; u2 = u + eh * p; p2 = p + eh * a1; a2 = -g1 * u2; u3 = u + eh * p2; p3 = p + eh * a2; a3 = -g1 * u3; u4 = u + e * p3; p4 = p + e * a3; a4 = -g2 * u4;
    const A12 = u + e6 * (p + 2 * p2 + 2 * p3 + p4), A22 = p + e6 * (a1 + 2 * a2 + 2 * a3 + a4);
    const U = axis === 0 ? X0 : Y0, P = axis === 0 ? P0 : Q0;
    const det = A11 * A22 - A12 * A21;
    out[2 * axis] = A11; out[2 * axis + 1] = A12;
    out[4 + 2 * axis] = (A22 * U - A12 * P) / det;
    out[5 + 2 * axis] = (-A21 * U + A11 * P) / det;
  }
}

/**
 * Fate of an ion that leaves the quadrupole at zEnd at time tExit: through the open drifts to
 * the end (detected) unless max_time comes first (alive); openDrifts()' arithmetic.
 */
function openExit(run: Run, vz: number, tExit: number): number {
  const stages = run.stages;
  let t = tExit, z = run.stage.zEnd;
  for (let q = run.s0 + 1; q < stages.length; q++) {
    const te = (stages[q].zEnd - z) / vz, tl = run.maxTime - t;
    if (tl < te) return Fate.alive;
    t += te; z = stages[q].zEnd;
  }
  return Fate.detected;
}

/**
 * Fate of an ion that passed every check in the rods, from its exit state (S.out, from
 * stableExit()): the exit plate, then straight through the open drifts (openDrifts()' arithmetic)
 * to the detector in the last exit plane, unless max_time comes first (alive).
 */
function beyondRods(run: Run): number {
  const o = S.out, vz = o[4], tExit = o[5], r0 = run.stage.r0, toP = 1 / (r0 * (TWO_PI * run.stage.rf.frequency));
  // The per-ion path's exit state, the same arithmetic: X·r0 and PX / toP.
  let x = o[0] * r0, y = o[2] * r0;
  if (x * x + y * y >= run.exit2) return Fate.hit;
  const vx = o[1] / toP, vy = o[3] / toP;
  const stages = run.stages;
  let t = tExit, z = run.stage.zEnd;
  for (let q = run.s0 + 1; q < stages.length; q++) {
    const te = (stages[q].zEnd - z) / vz, tl = run.maxTime - t;
    if (tl < te) return Fate.alive;
    t += te; z = stages[q].zEnd; x += vx * te; y += vy * te;
  }
  return x * x + y * y >= run.detector2 ? Fate.missed : Fate.detected;
}

/** The most periods any ion of the run can spend in the stage. */
function periodsTop(run: Run): number {
  return Math.floor(run.maxTime * run.stage.rf.frequency) + 1;
}

/**
 * |U_K| − bound for a growing axis with spectral rows `sp`: the sample after K whole periods
 * from start state (u, p) at phase θ_i0 + wt·δθ, U_K = λ^K·(p1·w) + λ^−K·(p2·w), less the
 * interpolation bound (transfer-matrix.ts). Capped K (|λ|^K past 1e150) uses the largest K
 * held: an earlier period end inside the rods is a check too.
 */
function spectralReach(sp: SpectralRows, K: number, i0: number, wt: number, u: number, p: number): number {
  const L = sp.lamPow[K < sp.count ? K : sp.count - 1], aL = Math.abs(L), wt1 = 1 - wt;
  const A = (wt1 * sp.a1[i0] + wt * sp.a1[i0 + 1]) * u + (wt1 * sp.b1[i0] + wt * sp.b1[i0 + 1]) * p;
  const B = (wt1 * sp.a2[i0] + wt * sp.a2[i0 + 1]) * u + (wt1 * sp.b2[i0] + wt * sp.b2[i0 + 1]) * p;
  const err = (aL * sp.err1 + sp.err2 / aL) * (Math.abs(u) + Math.abs(p));
  return Math.abs(L * A + B / L) - err;
}

/** What both run loops read of the stage and the grid, once per run. */
interface RunConsts {
  M: number; h: number; omega: number; phase: number; r0: number; toP: number; zEnd: number;
  dT: number; nn: number; kTop: number;
}

function runConsts(run: Run, grid: PeriodTable): RunConsts {
  const M = grid.checks, f = run.stage.rf.frequency, omega = TWO_PI * f, r0 = run.stage.r0;
  return {
    M, h: 1 / f / M, omega, phase: run.stage.rf.phase, r0, toP: 1 / (r0 * omega), zEnd: run.stage.zEnd,
    dT: grid.dTheta, nn: grid.n, kTop: periodsTop(run),
  };
}

/** Spectral rows of a table that is there and growing (finite λ), else null. */
function growing(t: PeriodTable | null, kTop: number): SpectralRows | null {
  return t === null || t.stable || !Number.isFinite(t.lambda) ? null : spectralRows(t, kTop);
}

/**
 * A run with a growing axis. Only the growing table may be there at first (the spectral test
 * needs no other); the other is asked for when an ion needs F(ψ) on both axes.
 */
function growingRun(run: Run, st: StartArrays, start: number, j0: number, j1: number, fate: Int8Array, done: Uint8Array, counts: BatchCounts): void {
  const { sc, maxTime, R2, entry2 } = run, zStart = run.stage.zStart;
  const { M, h, omega, phase, r0, toP, zEnd, dT, nn, kTop } = runConsts(run, (run.tx ?? run.ty)!);
  let spX = growing(run.tx, kTop), spY = growing(run.ty, kTop);
  // (1 + 1e-9): rounding between the spectral and the matrix-power forms of the same sample.
  const rLoss = Math.sqrt(R2) * (1 + 1e-9);
  const X = st.x, Y = st.y, VX = st.vx, VY = st.vy, Z = st.z, VZ = st.vz, TAU = st.tau;
  const E = S.entry;
  for (let j = j0; j < j1; j++) {
    // The ion's entry (as in stableRun; written out in both loops rather than in a helper that
    // would need a scratch array for its five results).
    const i = start + j;
    const vz = VZ[i] * sc;
    if (!(vz > 0)) continue;
    const tExit = (zEnd - Z[i]) / vz;
    if (!(tExit <= maxTime)) continue;
    const psi = phaseAt(omega, TAU[i], phase);
    const i0 = Math.min(nn - 1, Math.floor(psi / dT));
    const e = psi - i0 * dT;
    const full = Math.floor(tExit / h);
    const K = Math.floor(full / M);
    const X0 = X[i] / r0, P0 = VX[i] * sc * toP, Y0 = Y[i] / r0, Q0 = VY[i] * sc * toP;
    if (Z[i] === zStart && X[i] * X[i] + Y[i] * Y[i] >= entry2) { fate[j] = Fate.hit; done[j] = 1; continue; }
    if (K >= 1) {
      const wt = e / dT;
      if ((spX !== null && spectralReach(spX, K, i0, wt, X0, P0) >= rLoss) || (spY !== null && spectralReach(spY, K, i0, wt, Y0, Q0) >= rLoss)) {
        fate[j] = Fate.hit; done[j] = 1; counts.periodLoops++;
        continue;
      }
    }
    if (run.tx === null || run.ty === null) {
      run.complete(run);
      spX = growing(run.tx, kTop); spY = growing(run.ty, kTop);
    }
    const tx = run.tx!, ty = run.ty!;
    const a = S.arg;
    a[0] = e; a[1] = X0; a[2] = P0; a[3] = Y0; a[4] = Q0;
    entry(tx, ty, i0);
    if (growingExact(tx, ty, E[0], E[1], E[2], E[3], E[4], E[5], E[6], E[7], full, K, kTop, R2)) {
      fate[j] = Fate.hit; done[j] = 1; counts.periodLoops++;
    }
  }
}

/**
 * A growing ion the spectral test left: the last period-end sample exactly, F(ψ)·M0^K·c, then
 * the quiet periods (|U| ≤ |A|h1|λ|^(k+1) + |B|h2|λ|^−k per growing axis, the envelope of a
 * stable one, below r0) and the period-end samples one by one. True when a sample is at or
 * past r0; false leaves the ion to the per-ion tiers.
 */
function growingExact(tx: PeriodTable, ty: PeriodTable, F11: number, F12: number, G11: number, G12: number,
  cx1: number, cx2: number, cy1: number, cy2: number, full: number, K: number, kTop: number, R2: number): boolean {
  const M = tx.checks, v = S.v;
  if (K >= 1) {
    const want = Math.min(kTop, K);
    const n = Math.min(powers(tx, want), powers(ty, want));
    const kt = Math.min(K, n - 1);
    if (kt >= 1) {
      const PX = tx.pow, PY = ty.pow, o = 4 * kt;
      const ex1 = PX[o] * cx1 + PX[o + 1] * cx2, ex2 = PX[o + 2] * cx1 + PX[o + 3] * cx2;
      const ey1 = PY[o] * cy1 + PY[o + 1] * cy2, ey2 = PY[o + 2] * cy1 + PY[o + 3] * cy2;
      const Xe = F11 * ex1 + F12 * ex2, Ye = G11 * ey1 + G12 * ey2;
      if (Xe * Xe + Ye * Ye >= R2) return true;
    }
  }
  const g = 1 + ENVELOPE_MARGIN;
  const kMax = Math.ceil(full / M);
  const envX = tx.stable ? g * tx.wMax * (tx.gamma * cx1 * cx1 + 2 * tx.alpha * cx1 * cx2 + tx.beta * cx2 * cx2) : 0;
  const envY = ty.stable ? g * ty.wMax * (ty.gamma * cy1 * cy1 + 2 * ty.alpha * cy1 * cy2 + ty.beta * cy2 * cy2) : 0;
  const q = quietPeriods(tx, cx1, cx2, envX, ty, cy1, cy2, envY, kMax, R2);
  if (q >= kMax) return false;
  powerApply(tx, q, cx1, cx2, v); let dx1 = v[0], dx2 = v[1];
  powerApply(ty, q, cy1, cy2, v); let dy1 = v[0], dy2 = v[1];
  for (let base = q * M; base + M <= full; base += M) {
    const ex1 = tx.m11 * dx1 + tx.m12 * dx2, ex2 = tx.m21 * dx1 + tx.m22 * dx2;
    const ey1 = ty.m11 * dy1 + ty.m12 * dy2, ey2 = ty.m21 * dy1 + ty.m22 * dy2;
    const Xe = F11 * ex1 + F12 * ex2, Ye = G11 * ey1 + G12 * ey2;
    if (Xe * Xe + Ye * Ye >= R2) return true;
    dx1 = ex1; dx2 = ex2; dy1 = ey1; dy2 = ey2;
  }
  return false;
}

/**
 * Number of leading periods (at most kMax) in which no check can reach r0² by the eigen-bound of
 * each unstable axis (|U| ≤ |A|h1|λ|^(k+1) + |B|h2|λ|^−k) and the envelope of a stable one (envX,
 * envY: g·Wmax·I; unused for a growing axis).
 */
export function quietPeriods(tx: PeriodTable, cx1: number, cx2: number, envX: number, ty: PeriodTable, cy1: number, cy2: number, envY: number, kMax: number, R2: number): number {
  const g = 1 + ENVELOPE_MARGIN;
  let gx = 0, sx = 0, lx = 1, fx = 0;
  if (tx.stable) fx = envX;
  else {
    const l = Math.abs(tx.lambda);
    gx = g * Math.abs(tx.vi11 * cx1 + tx.vi12 * cx2) * tx.h1 * l;
    sx = g * Math.abs(tx.vi21 * cx1 + tx.vi22 * cx2) * tx.h2;
    lx = l;
  }
  let gy = 0, sy = 0, ly = 1, fy = 0;
  if (ty.stable) fy = envY;
  else {
    const l = Math.abs(ty.lambda);
    gy = g * Math.abs(ty.vi11 * cy1 + ty.vi12 * cy2) * ty.h1 * l;
    sy = g * Math.abs(ty.vi21 * cy1 + ty.vi22 * cy2) * ty.h2;
    ly = l;
  }
  const ix = 1 / lx, iy = 1 / ly;
  let k = 0;
  for (; k < kMax; k++) {
    const bx = tx.stable ? fx : (gx + sx) * (gx + sx);
    const by = ty.stable ? fy : (gy + sy) * (gy + sy);
    if (!(bx + by < R2)) break;
    gx *= lx; sx *= ix; gy *= ly; sy *= iy;
  }
  return k;
}

/**
 * Rotation table S.rot[4k..4k+3] = cos kμx, sin kμx, cos kμy, sin kμy, k = 0..kTop.
 * By rotation from the last exact value (Math.cos, Math.sin every 32 steps): the drift between
 * anchors is a few 1e-15, far inside the 1e-6 margin of the bounds that use it.
 */
function rotations(muX: number, muY: number, kTop: number): void {
  if (S.rot.length < 4 * (kTop + 1)) S.rot = new Float64Array(4 * (kTop + 1));
  const R = S.rot;
  const cx = Math.cos(muX), sx = Math.sin(muX), cy = Math.cos(muY), sy = Math.sin(muY);
  for (let k = 0; k <= kTop; k++) {
    const o = 4 * k;
    if ((k & 31) === 0) {
      R[o] = Math.cos(k * muX); R[o + 1] = Math.sin(k * muX); R[o + 2] = Math.cos(k * muY); R[o + 3] = Math.sin(k * muY);
    } else {
      R[o] = R[o - 4] * cx - R[o - 3] * sx; R[o + 1] = R[o - 3] * cx + R[o - 4] * sx;
      R[o + 2] = R[o - 2] * cy - R[o - 1] * sy; R[o + 3] = R[o - 1] * cy + R[o - 2] * sy;
    }
  }
}

/** An upper bound of the invariant of state (u, p) at phase θ_i0 + wt·δθ from TwissRows `q`. */
function invariantUp(q: TwissRows, i0: number, wt: number, u: number, p: number): number {
  const wt1 = 1 - wt;
  const q11 = wt1 * q.q11[i0] + wt * q.q11[i0 + 1], q12 = wt1 * q.q12[i0] + wt * q.q12[i0 + 1], q22 = wt1 * q.q22[i0] + wt * q.q22[i0 + 1];
  return q11 * u * u + 2 * q12 * u * p + q22 * p * p + q.e11 * u * u + 2 * q.e12 * Math.abs(u * p) + q.e22 * p * p;
}

function stableRun(run: Run, tx: PeriodTable, ty: PeriodTable, st: StartArrays, start: number, j0: number, j1: number, fate: Int8Array, done: Uint8Array, counts: BatchCounts): void {
  const { sc, maxTime, R2, entry2, exitState } = run, zStart = run.stage.zStart;
  const { M, h, omega, phase, r0, toP, zEnd, dT, nn, kTop } = runConsts(run, tx);
  // All-time envelope: the grid's largest W plus what W can add between grid points.
  const gx = tx.gamma, ax = tx.alpha, bx = tx.beta, Wx = tx.wMax + tx.wMargin;
  const gy = ty.gamma, ay = ty.alpha, by = ty.beta, Wy = ty.wMax + ty.wMargin;
  if (S.dx1.length < kTop + 1) {
    S.dx1 = new Float64Array(kTop + 1); S.dx2 = new Float64Array(kTop + 1);
    S.dy1 = new Float64Array(kTop + 1); S.dy2 = new Float64Array(kTop + 1);
  }
  if (S.cand.length < M + 1) { S.cand = new Int32Array(M + 1); S.env = new Float64Array(M + 1); }
  let rotTop = -1; // rotations() filled for this run up to rotTop
  // Exit states need M0^K for every K an ion can spend in the rods: tabulate once per run.
  if (exitState) { powers(tx, kTop + 1); powers(ty, kTop + 1); }
  const qx = twissRows(tx), qy = twissRows(ty);
  const X = st.x, Y = st.y, VX = st.vx, VY = st.vy, Z = st.z, VZ = st.vz, TAU = st.tau;
  const E = S.entry;
  for (let j = j0; j < j1; j++) {
    const i = start + j;
    const vz = VZ[i] * sc;
    if (!(vz > 0)) continue;
    const tExit = (zEnd - Z[i]) / vz;
    if (!(tExit <= maxTime)) continue;
    const psi = phaseAt(omega, TAU[i], phase);
    const i0 = Math.min(nn - 1, Math.floor(psi / dT));
    const e = psi - i0 * dT;
    const X0 = X[i] / r0, P0 = VX[i] * sc * toP, Y0 = Y[i] / r0, Q0 = VY[i] * sc * toP;
    // The entrance plate (sim/stages/quadrupole/apertures.ts) for ions starting in its plane.
    if (Z[i] === zStart && X[i] * X[i] + Y[i] * Y[i] >= entry2) { fate[j] = Fate.hit; done[j] = 1; continue; }
    // Tier 1 first from the Courant–Snyder form at ψ (TwissRows, interpolated, plus its bound):
    // most ions pass here without F(ψ) being formed, unless the exit state is needed.
    if (!exitState && Wx * invariantUp(qx, i0, e / dT, X0, P0) + Wy * invariantUp(qy, i0, e / dT, Y0, Q0) < R2) {
      counts.envelopeCleared++;
      fate[j] = openExit(run, vz, tExit);
      done[j] = 1;
      continue;
    }
    const a = S.arg;
    a[0] = e; a[1] = X0; a[2] = P0; a[3] = Y0; a[4] = Q0;
    entry(tx, ty, i0);
    const cx1 = E[4], cx2 = E[5], cy1 = E[6], cy2 = E[7];
    const ix = gx * cx1 * cx1 + 2 * ax * cx1 * cx2 + bx * cx2 * cx2;
    const iy = gy * cy1 * cy1 + 2 * ay * cy1 * cy2 + by * cy2 * cy2;
    a[1] = cx1; a[2] = cx2; a[3] = cy1; a[4] = cy2; a[7] = psi + omega * tExit;
    if (Wx * ix + Wy * iy < R2) {
      counts.envelopeCleared++;
      // Inside the rods' envelope everywhere, so the exit sample passes the rods too.
      if (exitState) { stableExit(tx, ty, R2); S.out[4] = vz; S.out[5] = tExit; fate[j] = beyondRods(run); done[j] = 1; continue; }
    } else {
      const full = Math.floor(tExit / h), Kp = Math.ceil(full / M);
      if (rotTop < Kp && (Kp * Math.abs(tx.muEff) < Math.PI || Kp * Math.abs(ty.muEff) < Math.PI)) {
        rotations(tx.muEff, ty.muEff, kTop);
        rotTop = kTop;
      }
      counts.periodLoops++;
      a[0] = e; a[1] = cx1; a[2] = cx2; a[3] = cy1; a[4] = cy2; a[5] = ix; a[6] = iy; a[7] = psi + omega * tExit;
      if (stableScan(tx, ty, i0, full, R2) || stableExit(tx, ty, R2)) {
        fate[j] = Fate.hit; done[j] = 1;
        continue;
      }
      if (exitState) { S.out[4] = vz; S.out[5] = tExit; fate[j] = beyondRods(run); done[j] = 1; continue; }
    }
    fate[j] = openExit(run, vz, tExit);
    done[j] = 1;
  }
}

/**
 * Both axes stable, fate only: true when some check inside the rods is at or past r0. In
 * Courant–Snyder form check m of period k has U = ρ_m·z_k = |ρ_m||z|·cos(kμ + φ_m), z_k the
 * normalized state turning by μ per period, |ρ_m|² = W(θ_m). Candidates: the checks whose
 * envelope Ix·Wx + Iy·Wy (W from the grid at the two points around the check's phase, plus the
 * margin for the curve between them) reaches r0². They go largest envelope first, each over
 * every period: a lost ion is mostly found at its first candidate. Before its scan a candidate's
 * row is computed and its arc over the stage tested (U² ≤ the largest cos² on the arc the angle
 * sweeps in Kp periods; 1 when the arc holds a multiple of π). d_k = M0^k·c is kept per period
 * for the ion's later candidates. Needs S.rot up to Kp when an arc is shorter than π.
 */
function stableScan(tx: PeriodTable, ty: PeriodTable, i0: number, full: number, R2: number): boolean {
  const a0 = S.arg, e = a0[0], cx1 = a0[1], cx2 = a0[2], cy1 = a0[3], cy2 = a0[4], ix = a0[5], iy = a0[6];
  const M = tx.checks, Sg = tx.sub, nn = tx.n, Kp = Math.ceil(full / M);
  const wux = tx.wUp, wuy = ty.wUp;
  const cand = S.cand, env = S.env;
  let nc = 0;
  for (let m = 1; m <= M; m++) {
    let ii = i0 + m * Sg;
    if (ii >= nn) ii -= nn;
    const bnd = wux[ii] * ix + wuy[ii] * iy;
    if (bnd >= R2) { cand[nc] = m; env[nc] = bnd; nc++; }
  }
  if (nc === 0) return false;
  const bx = tx.beta, ax = tx.alpha, by = ty.beta, ay = ty.alpha;
  const sbx = Math.sqrt(bx), sby = Math.sqrt(by);
  const zx1 = cx1 / sbx, zx2 = (ax * cx1) / sbx + sbx * cx2;
  const zy1 = cy1 / sby, zy2 = (ay * cy1) / sby + sby * cy2;
  const wholeX = Kp * Math.abs(tx.muEff) >= Math.PI, wholeY = Kp * Math.abs(ty.muEff) >= Math.PI;
  let cLx = 1, sLx = 0, cLy = 1, sLy = 0;
  if (!wholeX || !wholeY) {
    const R = S.rot;
    cLx = R[4 * Kp]; sLx = R[4 * Kp + 1]; cLy = R[4 * Kp + 2]; sLy = R[4 * Kp + 3];
  }
  const e2 = e * e, E2 = 0.5 * e2, E3 = (e2 * e) / 6;
  const cs = tx.cos, sn = tx.sin;
  const f11x = tx.f11, f12x = tx.f12, f21x = tx.f21, f22x = tx.f22, w0x = tx.w0, w1x = tx.w1;
  const f11y = ty.f11, f12y = ty.f12, f21y = ty.f21, f22y = ty.f22, w0y = ty.w0, w1y = ty.w1;
  const m11x = tx.m11, m12x = tx.m12, m21x = tx.m21, m22x = tx.m22;
  const m11y = ty.m11, m12y = ty.m12, m21y = ty.m21, m22y = ty.m22;
  const DX1 = S.dx1, DX2 = S.dx2, DY1 = S.dy1, DY2 = S.dy2;
  DX1[0] = cx1; DX2[0] = cx2; DY1[0] = cy1; DY2[0] = cy2;
  let kd = 1; // d_k known for k < kd
  for (let left = nc; left > 0; left--) {
    // The remaining candidate of largest envelope, swapped to the end of the live part.
    let best = 0;
    for (let q = 1; q < left; q++) if (env[q] > env[best]) best = q;
    const m = cand[best];
    cand[best] = cand[left - 1]; env[best] = env[left - 1];
    let ii = i0 + m * Sg;
    const wrap = ii >= nn;
    if (wrap) ii -= nn;
    // rowAt(), inlined (third-order Taylor from the grid point); past 2π the row is r·M0.
    const wxx = w0x + w1x * cs[ii], dwx = -w1x * sn[ii], wyy = w0y + w1y * cs[ii], dwy = -w1y * sn[ii];
    let a = f11x[ii], pa = f21x[ii], b2 = f12x[ii], pb = f22x[ii];
    let r1 = a + e * pa - E2 * wxx * a - E3 * (dwx * a + wxx * pa);
    let r2 = b2 + e * pb - E2 * wxx * b2 - E3 * (dwx * b2 + wxx * pb);
    if (wrap) { const w1 = r1 * m11x + r2 * m21x; r2 = r1 * m12x + r2 * m22x; r1 = w1; }
    a = f11y[ii]; pa = f21y[ii]; b2 = f12y[ii]; pb = f22y[ii];
    let t1 = a + e * pa - E2 * wyy * a - E3 * (dwy * a + wyy * pa);
    let t2 = b2 + e * pb - E2 * wyy * b2 - E3 * (dwy * b2 + wyy * pb);
    if (wrap) { const w1 = t1 * m11y + t2 * m21y; t2 = t1 * m12y + t2 * m22y; t1 = w1; }
    if (!wholeX || !wholeY) {
      // ρ = L⁻ᵀ·row; C = ρ·z = |ρ||z|cos a, Sv = ρ×z = |ρ||z|sin a at k = 0; the arc's far end
      // by the rotation through Kp·μ; U² ≤ max(C², C_end²) unless sin changes sign on the arc.
      const px1 = sbx * r1 - (ax * r2) / sbx, px2 = r2 / sbx;
      let bxm = (px1 * px1 + px2 * px2) * ix;
      if (!wholeX) {
        const Cx = px1 * zx1 + px2 * zx2, Sx = px1 * zx2 - px2 * zx1;
        const C2 = Cx * cLx - Sx * sLx, S2 = Sx * cLx + Cx * sLx;
        if (!((Sx > 0) !== (S2 > 0) || Sx === 0 || S2 === 0)) bxm = Math.max(Cx * Cx, C2 * C2);
      }
      const py1 = sby * t1 - (ay * t2) / sby, py2 = t2 / sby;
      let bym = (py1 * py1 + py2 * py2) * iy;
      if (!wholeY) {
        const Cy = py1 * zy1 + py2 * zy2, Sy = py1 * zy2 - py2 * zy1;
        const C2 = Cy * cLy - Sy * sLy, S2 = Sy * cLy + Cy * sLy;
        if (!((Sy > 0) !== (S2 > 0) || Sy === 0 || S2 === 0)) bym = Math.max(Cy * Cy, C2 * C2);
      }
      // Margin for the invariant's drift under the (non-symplectic) RK4 table (≲ 1e-12 per
      // period) and for rounding in the rotation: 1e-6 relative.
      if ((bxm + bym) * (1 + 1e-6) < R2) continue;
    }
    // Every period whose check m lies inside the rods: k·M + m ≤ full.
    for (let k = 0; k * M + m <= full; k++) {
      if (k === kd) {
        const o = k - 1;
        DX1[k] = m11x * DX1[o] + m12x * DX2[o]; DX2[k] = m21x * DX1[o] + m22x * DX2[o];
        DY1[k] = m11y * DY1[o] + m12y * DY2[o]; DY2[k] = m21y * DY1[o] + m22y * DY2[o];
        kd++;
      }
      const Xc = r1 * DX1[k] + r2 * DX2[k], Yc = t1 * DY1[k] + t2 * DY2[k];
      if (Xc * Xc + Yc * Yc >= R2) return true;
    }
  }
  return false;
}

/**
 * The exit sample (the direct kernel's shortened last step): F(θr)·M0^K·c at θ_end = θr + 2πK
 * (S.arg); true when it is at or past r0. The whole exit state goes to S.out. F(θr) is one RK4
 * step of ε = θr − θ_i from grid point i, and RK4 is linear, so F(θr)·d is that step applied to
 * F(θ_i)·d: one step per axis rather than one per column of F (fAt()), equal up to rounding.
 */
function stableExit(tx: PeriodTable, ty: PeriodTable, R2: number): boolean {
  const a = S.arg, thEnd = a[7];
  let K = Math.floor(thEnd / TWO_PI);
  let thr = thEnd - K * TWO_PI;
  if (thr >= TWO_PI) { thr -= TWO_PI; K++; }
  if (thr < 0) thr = 0;
  let i = Math.floor(thr / tx.dTheta);
  if (i >= tx.n) i = tx.n - 1;
  const e = thr - i * tx.dTheta;
  // cos, sin of e and e/2 (smallAngle()'s series; e < 2π/640).
  const e2 = e * e, hh = 0.5 * e, h2 = hh * hh;
  const ce = 1 - 0.5 * e2 * (1 - e2 / 12), se = e * (1 - (e2 / 6) * (1 - e2 / 20));
  const ch = 1 - 0.5 * h2 * (1 - h2 / 12), sh = hh * (1 - (h2 / 6) * (1 - h2 / 20));
  const c = tx.cos[i], sn = tx.sin[i];
  const k1 = c * ch - sn * sh, k2 = c * ce - sn * se;
  const v = S.v, o = S.out;
  for (let axis = 0; axis < 2; axis++) {
    const t = axis === 0 ? tx : ty;
    const d1 = a[1 + 2 * axis], d2 = a[2 + 2 * axis];
    // M0^K·c from the power table when stableRun() filled it that far, else by squaring.
    if (K < t.powCount) {
      const P = t.pow, q = 4 * K;
      v[0] = P[q] * d1 + P[q + 1] * d2; v[1] = P[q + 2] * d1 + P[q + 3] * d2;
    } else powerApply(t, K, d1, d2, v);
    const u = t.f11[i] * v[0] + t.f12[i] * v[1], p = t.f21[i] * v[0] + t.f22[i] * v[1];
    const g0 = t.w0 + t.w1 * c, g1 = t.w0 + t.w1 * k1, g2 = t.w0 + t.w1 * k2;
    const a1 = -g0 * u, u2 = u + hh * p, p2 = p + hh * a1, a2 = -g1 * u2;
    const u3 = u + hh * p2, p3 = p + hh * a2, a3 = -g1 * u3;
    const u4 = u + e * p3, p4 = p + e * a3, a4 = -g2 * u4;
    o[2 * axis] = u + (e / 6) * (p + 2 * p2 + 2 * p3 + p4);
    o[2 * axis + 1] = p + (e / 6) * (a1 + 2 * a2 + 2 * a3 + a4);
  }
  return o[0] * o[0] + o[2] * o[2] >= R2;
}
