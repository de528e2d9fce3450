// The exact fast path for linear scenes (ideal quadrupoles and field-free drifts, no gas, no
// space charge, no RF ramp): each ion's fate from its start state without stepping the RF.
//
// Same ions as the engine: every start state comes from startIon (counter-based streams), and
// drift stages run the engine's own closed-form kernel. In a quadrupole the x and y motions are
// linear (transfer-matrix.ts), so with c = F(ψ)⁻¹·w(entry) in phase-0 coordinates the state at
// check n = k·M + m after entry is F(ψ + mΔ)·M0^k·c. The checks are the direct kernel's: every
// step end t_entry + n·T/M (n = 1..floor(span/h)) and the stage exit, loss when x² + y² ≥ r0².
// Three tiers keep it cheap:
//  1. both axes stable and the Courant–Snyder envelope √(I·Wmax) per axis keeps x² + y² below
//     r0² at every phase: the ion survives the stage whatever its length (no period is visited);
//  2. otherwise period by period: d_k = M0^k c by one 2×2 product per axis; the checks of period
//     k are skipped while the bound min(d·E·d, envelope) summed over the axes stays below r0²;
//  3. else four probe checks of that period (a sample past the electrodes decides a loss), and
//     only for ions that no probe catches, every check of the flagged periods (rows of F from
//     the ion's own phase, computed on first use).
// When both axes are stable, that last scan visits only the check phases whose per-check
// envelope reaches r0 (see quadrupole()).
// The common layout (ions start in a quadrupole followed only by open drifts, start draws reused)
// runs first as one tight loop over the batch (tier1Batch): tier 1, the same per-check scan for
// stable ions with each check further bounded by the arc its Floquet phase sweeps in the rods, and
// for growing ions the quiet-period jump plus period-end checks; whatever it cannot decide goes
// through the per-ion code above. Both apply the same arithmetic to the same checks.
// A loss is decided by a check sample at or past r0 (the same samples as the direct kernel); the
// hit time reported is that sample's, which for probe-caught ions may be a little after the first.
// The exit state is F(θ_exit mod 2π)·M0^K·c with M0^K by repeated squaring.

import type { DriftStage, QuadrupoleStage, Scene } from '../scene/types.js';
import { allocateBatch, Fate } from '../engine/batch.js';
import { Exit, storeCursor, type ExitCode, type IonCursor, type StepContext } from '../engine/context.js';
import { populationOffsets, referenceOmega, startIon } from '../engine/start.js';
import { ELEMENTARY_CHARGE, ionMassKg } from '../units/constants.js';
import { trackUniform } from '../engine/kernels/uniform.js';
import { fAt, fAtGrid, mat2, periodTable, powerApply, powers, releaseSpectral, rowAt, smallAngle, spectralRows, type PeriodTable } from './transfer-matrix.js';

/**
 * Safety margin of tier 1: Wmax is the largest W on the grid (2π/(M·S) apart); between grid points
 * W can exceed it by about W''·δθ²/8 ≲ 10·(2π/640)²/8 ≈ 1.2e-4 of W (W'' / W is of order
 * |w0| + |w1| + 1 ≲ 10 in phase units). 1e-3 covers that eightfold; ions inside the margin take
 * the exact tiers.
 */
const ENVELOPE_MARGIN = 1e-3;

const STAGE_KEYS: Record<string, ReadonlySet<string>> = {
  quadrupole: new Set(['type', 'length', 'r0', 'rf', 'dc', 'zStart', 'zEnd', 'sceneIndex', 'gas']),
  drift: new Set(['type', 'length', 'aperture', 'zStart', 'zEnd', 'sceneIndex', 'gas']),
};
const RF_KEYS = new Set(['amplitude', 'frequency', 'phase']);

/**
 * Why the scene is not linear (the fast path does not apply), or null when it is: only ideal
 * quadrupole and drift stages, no gas, no space charge, no RF ramp. Any setting this module does
 * not know makes the scene non-linear, so new features default to direct integration.
 */
export function nonLinearReason(scene: Scene): string | null {
  if (scene.gas) return 'buffer gas';
  if (scene.spaceCharge) return 'space charge';
  for (let i = 0; i < scene.stages.length; i++) {
    const st = scene.stages[i] as unknown as Record<string, unknown>;
    const keys = STAGE_KEYS[st.type as string];
    if (!keys) return `stage ${i} is a ${String(st.type)} stage`;
    if (st.gas) return `gas in stage ${i}`;
    for (const k of Object.keys(st)) if (!keys.has(k) && st[k] !== undefined) return `stage ${i} sets ${k}`;
    if (st.type === 'quadrupole') {
      const rf = st.rf as Record<string, unknown>;
      if (rf.ramp) return `RF ramp in stage ${i}`;
      for (const k of Object.keys(rf)) if (!RF_KEYS.has(k) && rf[k] !== undefined) return `stage ${i} rf sets ${k}`;
    }
  }
  return null;
}

export interface LinearOptions {
  /**
   * Loss radius as a multiple of r0 (default 1). Diagnostics only: the tests run 0.98 and 1.02 to
   * find ions whose fate does not hinge on the exact loss radius.
   */
  radiusScale?: number;
}

interface AxisPair { x: PeriodTable; y: PeriodTable }

/** The one-ion batch and context the drift kernel reads (shared: trackers never run at once). */
const ONE_ION = allocateBatch(1);

/**
 * Scratch shared by every tracker, grown on demand: the ion's sampled first rows of F per axis
 * (stamped per ion), candidate checks, the batch pass's done mask. track() runs start to end
 * without yielding, so trackers in one thread never interleave; sharing saves a sweep the
 * allocation (and collection) of these arrays at every point.
 */
const SCRATCH = {
  rx1: new Float64Array(0), rx2: new Float64Array(0), ry1: new Float64Array(0), ry2: new Float64Array(0),
  rowStamp: new Float64Array(0), stamp: 0, cand: new Int32Array(0), doneMask: new Uint8Array(0),
  // Stable tier 2: each candidate's envelope, cos and sin of k·μx, k·μy (rotations()) and the
  // ion's d_k = M0^k·c per axis (components 1, 2), k = 0..kTop.
  env: new Float64Array(0), rot: new Float64Array(0),
  dx1: new Float64Array(0), dx2: new Float64Array(0), dy1: new Float64Array(0), dy2: new Float64Array(0),
};


/**
 * SCRATCH.rot[4k..4k+3] = cos kμx, sin kμx, cos kμy, sin kμy for k = 0..kTop; returns kTop + 1.
 * By rotation from the last exact value (Math.cos, Math.sin every 32 steps): the drift between
 * anchors is a few 1e-15, far inside the 1e-6 margin of the bounds that use it.
 */
function rotations(muX: number, muY: number, kTop: number): number {
  if (SCRATCH.rot.length < 4 * (kTop + 1)) SCRATCH.rot = new Float64Array(4 * (kTop + 1));
  const R = SCRATCH.rot;
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
  return kTop + 1;
}

/** Tables of finished trackers, whose arrays the next point's tables reuse. */
const spareTables: PeriodTable[] = [];

/**
 * Every ion's start state as startIon gives it, kept so that later points of a sweep can reuse
 * the draws. startIon reads the seed, the populations, the stage z ranges and the reference RF
 * frequency (for the start offset τ); when those agree a point reuses the states, and when only
 * a population's m/z differs its velocities scale by √(m_cached/m) (same kinetic energy and
 * direction draws: ½mv² fixed). test/sweep checks the reuse against fresh startIon calls.
 */
export class StartStates {
  readonly signature: string;
  readonly count: number;
  readonly x: Float64Array; readonly y: Float64Array; readonly z: Float64Array;
  readonly vx: Float64Array; readonly vy: Float64Array; readonly vz: Float64Array;
  readonly tau: Float64Array; readonly stage: Int32Array;
  /** Mass per population when the states were drawn, kg. */
  readonly mass: number[];

  constructor(scene: Scene) {
    this.signature = startSignature(scene);
    const off = populationOffsets(scene);
    const n = off[off.length - 1];
    this.count = n;
    const f = () => new Float64Array(n);
    this.x = f(); this.y = f(); this.z = f(); this.vx = f(); this.vy = f(); this.vz = f(); this.tau = f();
    this.stage = new Int32Array(n);
    this.mass = scene.ions.map((p) => ionMassKg(p.mz, p.charge));
    const b = allocateBatch(1);
    let pop = 0;
    for (let ion = 0; ion < n; ion++) {
      while (ion >= off[pop + 1]) pop++;
      this.tau[ion] = startIon(scene, b, 0, ion, pop, scene.ions[pop]);
      this.x[ion] = b.x[0]; this.y[ion] = b.y[0]; this.z[ion] = b.z[0];
      this.vx[ion] = b.vx[0]; this.vy[ion] = b.vy[0]; this.vz[ion] = b.vz[0];
      this.stage[ion] = b.stage[0];
    }
  }

  /** Whether these states serve `scene` (up to the m/z of its populations). */
  serves(scene: Scene): boolean {
    return startSignature(scene) === this.signature;
  }
}

const signatures = new WeakMap<Scene, string>();

/** What startIon reads, except the populations' m/z (kept per scene object: asked twice a point). */
function startSignature(scene: Scene): string {
  let sig = signatures.get(scene);
  if (sig === undefined) { sig = signatureOf(scene); signatures.set(scene, sig); }
  return sig;
}

function signatureOf(scene: Scene): string {
  return JSON.stringify({
    seed: scene.seed,
    ions: scene.ions.map((p) => ({ ...p, mz: 0 })),
    stages: scene.stages.map((s) => [s.zStart, s.zEnd]),
    omega: referenceOmega(scene),
  });
}

/** Fates of ions by the transfer-matrix path; one tracker serves one scene. */
export class LinearTracker {
  private readonly tables = new Map<number, AxisPair>();
  private readonly r2: number;
  /** Whether a stage after (before) stage s looks at the transverse state. */
  private readonly needAfter: boolean[];
  private readonly needBefore: boolean[];
  private readonly openTail: boolean[];
  private readonly offsets: number[];
  private readonly b = ONE_ION;
  private readonly ctx: StepContext;
  private readonly c: IonCursor = { ion: 0, slot: 0, m: 0, q: 0, tau: 0, t: 0, x: 0, y: 0, z: 0, vx: 0, vy: 0, vz: 0, steps: 0, sinceRecord: 0, nextHist: 0 };
  // Scratch: a matrix, a vector (the row scratch is shared, see SCRATCH).
  private readonly row = new Float64Array(2);
  private readonly fm = mat2();
  private readonly v = new Float64Array(2);
  /** Ions decided by tier 1 / tier 2-3 in quadrupole stages (for the benchmark's breakdown). */
  envelopeCleared = 0;
  periodLoops = 0;
  /** Ions left to the per-ion path by the batch pass. */
  perIon = 0;

  constructor(private readonly scene: Scene, opts: LinearOptions = {}) {
    const why = nonLinearReason(scene);
    if (why !== null) throw new Error(`transfer-matrix path needs a linear scene (${why})`);
    const s = opts.radiusScale ?? 1;
    this.r2 = s * s;
    this.offsets = populationOffsets(scene);
    const looks = scene.stages.map((st) => st.type === 'quadrupole' || Number.isFinite((st as DriftStage).aperture));
    this.needAfter = looks.map((_, s) => looks.slice(s + 1).some(Boolean));
    this.needBefore = looks.map((_, s) => looks.slice(0, s).some(Boolean));
    // Stage s is followed only by drifts without aperture or gas (vz > 0 there stays > 0).
    this.openTail = scene.stages.map((_, s) => s < scene.stages.length - 1
      && scene.stages.slice(s + 1).every((t) => t.type === 'drift' && !Number.isFinite(t.aperture) && !t.gas));
    this.ctx = { batch: this.b, maxTime: scene.run.maxTime, recordEvery: 0, rec: null, hist: null, gas: null, gasField: null };
  }

  /**
   * Fate codes (Fate.detected / hit / alive) of global ions start..start+count−1 into `fate`.
   * With `starts` (drawn for this scene or one it serves, see StartStates) the draws are reused.
   */
  track(start: number, count: number, fate: Int8Array, endTime?: Float64Array, starts?: StartStates): void {
    const scene = this.scene, b = this.b, c = this.c;
    const cached = starts !== undefined && starts.serves(scene) ? starts : null;
    const scale = cached ? scene.ions.map((p, k) => Math.sqrt(cached.mass[k] / ionMassKg(p.mz, p.charge))) : [];
    const mass = scene.ions.map((p) => ionMassKg(p.mz, p.charge)), charge = scene.ions.map((p) => p.charge * ELEMENTARY_CHARGE);
    // The batch pass decides fates only; hit times (endTime) come from the per-ion path.
    const done = cached && endTime === undefined ? this.tier1Batch(start, count, cached, scale, mass, charge, fate) : null;
    let pop = 0;
    while (start >= this.offsets[pop + 1]) pop++;
    for (let k = 0; k < count; k++) {
      const ion = start + k;
      while (ion >= this.offsets[pop + 1]) pop++;
      if (done !== null && done[k] === 1) continue;
      this.perIon++;
      let s: number;
      if (cached) {
        const f = scale[pop];
        c.tau = cached.tau[ion];
        c.m = mass[pop]; c.q = charge[pop];
        c.x = cached.x[ion]; c.y = cached.y[ion]; c.z = cached.z[ion];
        c.vx = cached.vx[ion] * f; c.vy = cached.vy[ion] * f; c.vz = cached.vz[ion] * f;
        s = cached.stage[ion];
      } else {
        c.tau = startIon(scene, b, 0, ion, pop, scene.ions[pop]);
        c.m = b.mass[0]; c.q = b.charge[0];
        c.x = b.x[0]; c.y = b.y[0]; c.z = b.z[0]; c.vx = b.vx[0]; c.vy = b.vy[0]; c.vz = b.vz[0];
        s = b.stage[0];
      }
      c.ion = ion; c.slot = 0; c.t = 0; c.steps = 0;
      let f: number = Fate.alive;
      // Stage to stage exactly as the engine's trackBatch does. An ion drawn outside every stage
      // (a start spread reaching past the first entrance) never enters: counted as lost.
      for (;;) {
        if (s < 0) { f = Fate.hit; break; }
        const st = scene.stages[s];
        const code = st.type === 'quadrupole'
          ? this.quadrupole(s, pop, st, c)
          : trackUniform(st as DriftStage, c, this.ctx, scene.run.stepNoRf);
        if (code === Exit.hit) { f = Fate.hit; break; }
        if (code === Exit.time) { f = Fate.alive; break; }
        if (code === Exit.forward) {
          if (s === scene.stages.length - 1) { f = Fate.detected; break; }
          if (this.openTail[s]) { f = this.openDrifts(s + 1, c); break; }
          s++;
        } else {
          if (s === 0) { f = Fate.hit; break; }
          s--;
        }
      }
      fate[k] = f;
      if (endTime) endTime[k] = c.t;
    }
  }

  private pair(s: number, pop: number, st: QuadrupoleStage, m: number, q: number): AxisPair {
    const key = s * this.scene.ions.length + pop;
    let t = this.tables.get(key);
    if (!t) {
      // Mathieu a, q of the x axis for this ion (DESIGN.md; q carries the charge's sign).
      const omega = 2 * Math.PI * st.rf.frequency;
      const k = q / (m * st.r0 * st.r0 * omega * omega);
      const a = 8 * k * st.dc, qq = 4 * k * st.rf.amplitude;
      const M = this.scene.run.stepsPerCycle;
      t = { x: periodTable(a, qq, M, undefined, spareTables.pop()), y: periodTable(-a, -qq, M, undefined, spareTables.pop()) };
      this.tables.set(key, t);
      if (SCRATCH.rx1.length < M + 1) {
        SCRATCH.rx1 = new Float64Array(M + 1); SCRATCH.rx2 = new Float64Array(M + 1);
        SCRATCH.ry1 = new Float64Array(M + 1); SCRATCH.ry2 = new Float64Array(M + 1);
        SCRATCH.rowStamp = new Float64Array(M + 1);
        SCRATCH.cand = new Int32Array(M + 1); SCRATCH.env = new Float64Array(M + 1);
      }
    }
    return t;
  }

  /**
   * Number of leading periods (at most kMax) in which no check can reach r0² by the eigen-bound of
   * each unstable axis and the envelope of a stable one (see quadrupole()).
   */
  private quietPeriods(tx: PeriodTable, cx1: number, cx2: number, envX: number, ty: PeriodTable, cy1: number, cy2: number, envY: number, kMax: number, R2: number): number {
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
   * Forward through field-free drifts without apertures to the end: trackUniform's arithmetic for
   * a = 0, R = ∞ and no gas (crossing time (zEnd − z)/vz; out of time when max_time comes first).
   */
  private openDrifts(from: number, c: IonCursor): number {
    const st = this.scene.stages;
    for (let s = from; s < st.length; s++) {
      const tExit = (st[s].zEnd - c.z) / c.vz;
      const tLeft = this.ctx.maxTime - c.t;
      if (tLeft < tExit) { c.t += tLeft; c.z += tLeft * c.vz; return Fate.alive; }
      c.t += tExit; c.z = st[s].zEnd;
    }
    return Fate.detected;
  }

  private probeList: number[] = [];
  /** Probe checks of a period: its end (m = M, checked from F(ψ) directly), then M/2, M/4, 3M/4. */
  private probes(M: number): number[] {
    if (this.probeList[0] !== M) {
      const set = [M, Math.round(M / 2), Math.round(M / 4), Math.round((3 * M) / 4)].filter((m) => m >= 1 && m <= M);
      this.probeList = [...new Set(set)];
    }
    return this.probeList;
  }

  /** A loss at check n: position from the check; the velocity is not needed for the fate. */
  private hitAt(c: IonCursor, tEntry: number, n: number, h: number, x: number, y: number, z: number, vz: number): ExitCode {
    storeCursor(c, tEntry + n * h, x, y, z + n * h * vz, c.vx, c.vy, vz, n);
    return Exit.hit;
  }

  /** Hand this tracker's tables back for reuse; the tracker must not be used afterwards. */
  release(): void {
    for (const t of this.tables.values()) {
      releaseSpectral(t.x); releaseSpectral(t.y);
      if (spareTables.length < 16) spareTables.push(t.x, t.y);
    }
    this.tables.clear();
  }

  /** Check row m of both axes for the current ion (grid point i0 + m·S, offset eps). */
  private fillRow(tx: PeriodTable, ty: PeriodTable, m: number, i0: number, eps: number, stamp: number): void {
    let i = i0 + m * tx.sub;
    const wrap = i >= tx.n;
    if (wrap) i -= tx.n;
    const r = this.row;
    rowAt(tx, i, eps, r);
    let u1 = r[0], u2 = r[1];
    if (wrap) { const w1 = u1 * tx.m11 + u2 * tx.m21; u2 = u1 * tx.m12 + u2 * tx.m22; u1 = w1; }
    SCRATCH.rx1[m] = u1; SCRATCH.rx2[m] = u2;
    rowAt(ty, i, eps, r);
    u1 = r[0]; u2 = r[1];
    if (wrap) { const w1 = u1 * ty.m11 + u2 * ty.m21; u2 = u1 * ty.m12 + u2 * ty.m22; u1 = w1; }
    SCRATCH.ry1[m] = u1; SCRATCH.ry2[m] = u2;
    SCRATCH.rowStamp[m] = stamp;
  }


  /**
   * Tier 1 for a whole batch in one tight loop (the common layout: ions start in a quadrupole
   * stage that only open drifts follow, moving forward). Same arithmetic as quadrupole() for the
   * entry state and the envelope test; ions it cannot clear are left to the per-ion path.
   * Returns done[k] = 1 for the ions it decided.
   */
  private tier1Batch(start: number, count: number, st0: StartStates, scale: number[], mass: number[], charge: number[], fate: Int8Array): Uint8Array {
    if (SCRATCH.doneMask.length < count) SCRATCH.doneMask = new Uint8Array(count);
    const done = SCRATCH.doneMask;
    done.fill(0, 0, count);
    const scene = this.scene, stages = scene.stages, maxTime = this.ctx.maxTime, R2 = this.r2;
    const TWO_PI = 2 * Math.PI, g = 1 + ENVELOPE_MARGIN;
    let k = 0;
    while (k < count) {
      // A run of ions of one population starting in one stage.
      const ion0 = start + k;
      let pop = 0;
      while (ion0 >= this.offsets[pop + 1]) pop++;
      const s0 = st0.stage[ion0];
      let end = k + 1;
      const popEnd = this.offsets[pop + 1] - start;
      while (end < count && end < popEnd && st0.stage[start + end] === s0) end++;
      const st = s0 >= 0 ? stages[s0] : null;
      if (st === null || st.type !== 'quadrupole' || !(s0 === stages.length - 1 || this.openTail[s0])) { k = end; continue; }
      const { x: tx, y: ty } = this.pair(s0, pop, st, mass[pop], charge[pop]);
      const bothStable = tx.stable && ty.stable;
      const M = tx.checks, h = 1 / st.rf.frequency / M;
      // Unstable axes: eigen-bound terms (quietPeriods) and the monodromies for the jump.
      const lx = tx.stable ? 1 : Math.abs(tx.lambda), ly = ty.stable ? 1 : Math.abs(ty.lambda);
      const v = this.v;
      const omega = 2 * Math.PI * st.rf.frequency, phase = st.rf.phase, r0 = st.r0, toP = 1 / (r0 * omega);
      const dT = tx.dTheta, nn = tx.n, cs = tx.cos, sn = tx.sin;
      const f11x = tx.f11, f12x = tx.f12, f21x = tx.f21, f22x = tx.f22;
      const f11y = ty.f11, f12y = ty.f12, f21y = ty.f21, f22y = ty.f22;
      const w0x = tx.w0, w1x = tx.w1, w0y = ty.w0, w1y = ty.w1;
      const gx = tx.gamma, ax = tx.alpha, bx = tx.beta, Wx = g * tx.wMax;
      const gy = ty.gamma, ay = ty.alpha, by = ty.beta, Wy = g * ty.wMax;
      const sc = scale[pop], zEnd = st.zEnd;
      // Powers of M0 up to the most periods any ion of the run can spend in the stage.
      // Filled on demand (moreP) as far as the ions of the point need, at most kTop.
      const kTop = Math.floor(maxTime * st.rf.frequency) + 1;
      // (No closure here: one that assigned nPow would move it out of a register for the loop.)
      let nPow = Math.min(tx.powCount, ty.powCount), powCapped = false;
      const PX = tx.pow, PY = ty.pow;
      // Stable runs: |μ|, the W grids and their margins, the ion's d_k scratch.
      const absMuX = Math.abs(tx.muEff), absMuY = Math.abs(ty.muEff);
      const wgx = tx.w, wgy = ty.w, mgx = ENVELOPE_MARGIN * tx.wMax, mgy = ENVELOPE_MARGIN * ty.wMax, S = tx.sub;
      let rotCount = 0;
      // Growing axes: spectral rows (transfer-matrix.ts) for the one-sample loss test.
      const spX = tx.stable || !Number.isFinite(tx.lambda) ? null : spectralRows(tx, kTop);
      const spY = ty.stable || !Number.isFinite(ty.lambda) ? null : spectralRows(ty, kTop);
      const rLoss = Math.sqrt(R2) * (1 + 1e-9);
      if (SCRATCH.dx1.length < kTop + 1) {
        SCRATCH.dx1 = new Float64Array(kTop + 1); SCRATCH.dx2 = new Float64Array(kTop + 1);
        SCRATCH.dy1 = new Float64Array(kTop + 1); SCRATCH.dy2 = new Float64Array(kTop + 1);
      }
      const X = st0.x, Y = st0.y, VX = st0.vx, VY = st0.vy, Z = st0.z, VZ = st0.vz, TAU = st0.tau;
      for (let j = k; j < end; j++) {
        const i = start + j;
        const vz = VZ[i] * sc;
        if (!(vz > 0)) continue;
        const tExit = (zEnd - Z[i]) / vz;
        if (!(tExit <= maxTime)) continue;
        const th0 = omega * TAU[i] + phase;
        let psi = th0 - TWO_PI * Math.floor(th0 / TWO_PI);
        if (psi >= TWO_PI) psi -= TWO_PI;
        const i0 = Math.min(nn - 1, Math.floor(psi / dT));
        const e = psi - i0 * dT;
        if (spX !== null || spY !== null) {
          // A growing axis: its sample after the last whole period in the rods from the spectral
          // rows at ψ (SpectralRows, linear interpolation), U_K = λ^K·(p1·w) + λ^−K·(p2·w). When
          // |U_K| exceeds r0 by more than the interpolation bound, the check-by-check value does
          // too (margin 1e-9 for rounding): lost, without forming F(ψ) or c.
          const kt = Math.floor(Math.floor(tExit / h) / M);
          if (kt >= 1) {
            const wt = e / dT, wt1 = 1 - wt;
            let lost = false;
            if (spX !== null) {
              const u = X[i] / r0, p = VX[i] * sc * toP;
              const L = spX.lamPow[kt < spX.count ? kt : spX.count - 1], aL = Math.abs(L);
              const A = (wt1 * spX.a1[i0] + wt * spX.a1[i0 + 1]) * u + (wt1 * spX.b1[i0] + wt * spX.b1[i0 + 1]) * p;
              const B = (wt1 * spX.a2[i0] + wt * spX.a2[i0 + 1]) * u + (wt1 * spX.b2[i0] + wt * spX.b2[i0 + 1]) * p;
              const err = (aL * spX.err1 + spX.err2 / aL) * (Math.abs(u) + Math.abs(p));
              if (Math.abs(L * A + B / L) - err >= rLoss) lost = true;
            }
            if (!lost && spY !== null) {
              const u = Y[i] / r0, p = VY[i] * sc * toP;
              const L = spY.lamPow[kt < spY.count ? kt : spY.count - 1], aL = Math.abs(L);
              const A = (wt1 * spY.a1[i0] + wt * spY.a1[i0 + 1]) * u + (wt1 * spY.b1[i0] + wt * spY.b1[i0 + 1]) * p;
              const B = (wt1 * spY.a2[i0] + wt * spY.a2[i0 + 1]) * u + (wt1 * spY.b2[i0] + wt * spY.b2[i0 + 1]) * p;
              const err = (aL * spY.err1 + spY.err2 / aL) * (Math.abs(u) + Math.abs(p));
              if (Math.abs(L * A + B / L) - err >= rLoss) lost = true;
            }
            if (lost) {
              fate[j] = Fate.hit;
              done[j] = 1;
              this.periodLoops++;
              continue;
            }
          }
        }
        const e2 = e * e, hh = 0.5 * e, h2 = hh * hh, e6 = e / 6, eh = 0.5 * e;
        // smallAngle(), inlined: cos and sin of ε and ε/2 by their Taylor series.
        const ce = 1 - 0.5 * e2 * (1 - e2 / 12), se = e * (1 - (e2 / 6) * (1 - e2 / 20));
        const ch = 1 - 0.5 * h2 * (1 - h2 / 12), sh = hh * (1 - (h2 / 6) * (1 - h2 / 20));
        const c = cs[i0], s = sn[i0];
        const k1 = c * ch - s * sh, k2 = c * ce - s * se;
        // fAtGrid(), inlined: one RK4 step of ε on both columns, x then y.
        let g0 = w0x + w1x * c, g1 = w0x + w1x * k1, g2 = w0x + w1x * k2;
        let u = f11x[i0], p = f21x[i0];
        let a1 = -g0 * u, u2 = u + eh * p, p2 = p + eh * a1, a2 = -g1 * u2, u3 = u + eh * p2, p3 = p + eh * a2, a3 = -g1 * u3, u4 = u + e * p3, p4 = p + e * a3, a4 = -g2 * u4;
        const F11 = u + e6 * (p + 2 * p2 + 2 * p3 + p4), F21 = p + e6 * (a1 + 2 * a2 + 2 * a3 + a4);
        u = f12x[i0]; p = f22x[i0];
        a1 = -g0 * u; u2 = u + eh * p; p2 = p + eh * a1; a2 = -g1 * u2; u3 = u + eh * p2; p3 = p + eh * a2; a3 = -g1 * u3; u4 = u + e * p3; p4 = p + e * a3; a4 = -g2 * u4;
        const F12 = u + e6 * (p + 2 * p2 + 2 * p3 + p4), F22 = p + e6 * (a1 + 2 * a2 + 2 * a3 + a4);
        const X0 = X[i] / r0, P0 = VX[i] * sc * toP;
        let det = F11 * F22 - F12 * F21;
        const cx1 = (F22 * X0 - F12 * P0) / det, cx2 = (-F21 * X0 + F11 * P0) / det;
        g0 = w0y + w1y * c; g1 = w0y + w1y * k1; g2 = w0y + w1y * k2;
        u = f11y[i0]; p = f21y[i0];
        a1 = -g0 * u; u2 = u + eh * p; p2 = p + eh * a1; a2 = -g1 * u2; u3 = u + eh * p2; p3 = p + eh * a2; a3 = -g1 * u3; u4 = u + e * p3; p4 = p + e * a3; a4 = -g2 * u4;
        const G11 = u + e6 * (p + 2 * p2 + 2 * p3 + p4), G21 = p + e6 * (a1 + 2 * a2 + 2 * a3 + a4);
        u = f12y[i0]; p = f22y[i0];
        a1 = -g0 * u; u2 = u + eh * p; p2 = p + eh * a1; a2 = -g1 * u2; u3 = u + eh * p2; p3 = p + eh * a2; a3 = -g1 * u3; u4 = u + e * p3; p4 = p + e * a3; a4 = -g2 * u4;
        const G12 = u + e6 * (p + 2 * p2 + 2 * p3 + p4), G22 = p + e6 * (a1 + 2 * a2 + 2 * a3 + a4);
        const Y0 = Y[i] / r0, Q0 = VY[i] * sc * toP;
        det = G11 * G22 - G12 * G21;
        const cy1 = (G22 * Y0 - G12 * Q0) / det, cy2 = (-G21 * Y0 + G11 * Q0) / det;
        if (!bothStable) {
          // A growing ion. First one check at the end of the last full period inside the rods,
          // X = F(ψ)·M0^K·c from the power table: a sample there at or past r0 means the direct
          // kernel loses the ion at that check or an earlier one (the fate is all the batch pass
          // decides). Most growing ions are decided here. The others: skip the quiet periods,
          // then step period by period checking the period-end samples; an ion not caught that
          // way goes to the per-ion path, which decides it exactly.
          const full = Math.floor(tExit / h), kMax = Math.ceil(full / M);
          let kt = Math.floor(full / M);
          if (kt >= nPow && !powCapped) {
            const want = Math.min(kTop, kt + 32);
            nPow = Math.min(powers(tx, want), powers(ty, want));
            powCapped = nPow <= want; // entries past POW_LIMIT: the table stops growing
          }
          kt = Math.min(kt, nPow - 1);
          if (kt >= 1) {
            const o = 4 * kt;
            const ex1 = PX[o] * cx1 + PX[o + 1] * cx2, ex2 = PX[o + 2] * cx1 + PX[o + 3] * cx2;
            const ey1 = PY[o] * cy1 + PY[o + 1] * cy2, ey2 = PY[o + 2] * cy1 + PY[o + 3] * cy2;
            const Xe = F11 * ex1 + F12 * ex2, Ye = G11 * ey1 + G12 * ey2;
            if (Xe * Xe + Ye * Ye >= R2) {
              fate[j] = Fate.hit;
              done[j] = 1;
              this.periodLoops++;
              continue;
            }
          }
          const envX = tx.stable ? Wx * (gx * cx1 * cx1 + 2 * ax * cx1 * cx2 + bx * cx2 * cx2) : 0;
          const envY = ty.stable ? Wy * (gy * cy1 * cy1 + 2 * ay * cy1 * cy2 + by * cy2 * cy2) : 0;
          let gxu = 0, sxu = 0, gyu = 0, syu = 0;
          if (!tx.stable) { gxu = g * Math.abs(tx.vi11 * cx1 + tx.vi12 * cx2) * tx.h1 * lx; sxu = g * Math.abs(tx.vi21 * cx1 + tx.vi22 * cx2) * tx.h2; }
          if (!ty.stable) { gyu = g * Math.abs(ty.vi11 * cy1 + ty.vi12 * cy2) * ty.h1 * ly; syu = g * Math.abs(ty.vi21 * cy1 + ty.vi22 * cy2) * ty.h2; }
          const ilx = 1 / lx, ily = 1 / ly;
          let q = 0;
          for (; q < kMax; q++) {
            const bxq = tx.stable ? envX : (gxu + sxu) * (gxu + sxu);
            const byq = ty.stable ? envY : (gyu + syu) * (gyu + syu);
            if (!(bxq + byq < R2)) break;
            gxu *= lx; sxu *= ilx; gyu *= ly; syu *= ily;
          }
          if (q >= kMax) continue;
          powerApply(tx, q, cx1, cx2, v); let dx1 = v[0], dx2 = v[1];
          powerApply(ty, q, cy1, cy2, v); let dy1 = v[0], dy2 = v[1];
          let hit = false;
          for (let base = q * M; base + M <= full; base += M) {
            const ex1 = tx.m11 * dx1 + tx.m12 * dx2, ex2 = tx.m21 * dx1 + tx.m22 * dx2;
            const ey1 = ty.m11 * dy1 + ty.m12 * dy2, ey2 = ty.m21 * dy1 + ty.m22 * dy2;
            const Xe = F11 * ex1 + F12 * ex2, Ye = G11 * ey1 + G12 * ey2;
            if (Xe * Xe + Ye * Ye >= R2) {
              hit = true;
              break;
            }
            dx1 = ex1; dx2 = ex2; dy1 = ey1; dy2 = ey2;
          }
          if (!hit) continue;
          fate[j] = Fate.hit;
          done[j] = 1;
          this.periodLoops++;
          continue;
        }
        const ix = gx * cx1 * cx1 + 2 * ax * cx1 * cx2 + bx * cx2 * cx2;
        const iy = gy * cy1 * cy1 + 2 * ay * cy1 * cy2 + by * cy2 * cy2;
        if (!(Wx * ix + Wy * iy < R2)) {
          // Tier 2 with both axes stable, fate only. In Courant–Snyder form check m of period k
          // has U = ρ_m·z_k = |ρ_m||z|·cos(kμ + φ_m), z_k the normalized state turning by μ per
          // period, and |ρ_m|² = W(θ_m). Candidates: the checks whose envelope Ix·Wx + Iy·Wy (W
          // from the grid at the two points around the check's phase, plus the margin for the
          // curve between them) reaches r0². Any sample at or past r0 decides the loss (the
          // direct kernel stops at that check or an earlier one), so the candidates go in order
          // of their envelope, largest first, each over every period of the stage: a lost ion is
          // mostly found at its first candidate. Before its scan a candidate's row is computed
          // and its arc over the stage tested (U² ≤ the largest cos² on the arc the angle sweeps
          // in Kp periods; 1 when the arc holds a multiple of π). d_k = M0^k·c is kept per period
          // for the ion's later candidates.
          const full = Math.floor(tExit / h);
          const Kp = Math.ceil(full / M);
          let nc = 0;
          const cand = SCRATCH.cand, env = SCRATCH.env;
          for (let m = 1; m <= M; m++) {
            let ii = i0 + m * S;
            if (ii >= nn) ii -= nn;
            const wa = wgx[ii] > wgx[ii + 1] ? wgx[ii] : wgx[ii + 1], wb = wgy[ii] > wgy[ii + 1] ? wgy[ii] : wgy[ii + 1];
            const bnd = (wa + mgx) * ix + (wb + mgy) * iy;
            if (bnd >= R2) { cand[nc] = m; env[nc] = bnd; nc++; }
          }
          let hitAt = -1;
          if (nc > 0) {
            const sbx = Math.sqrt(bx), sby = Math.sqrt(by);
            const zx1 = cx1 / sbx, zx2 = (ax * cx1) / sbx + sbx * cx2;
            const zy1 = cy1 / sby, zy2 = (ay * cy1) / sby + sby * cy2;
            // The whole stage's arc, k = 0..Kp, from the rotation table of the run.
            const wholeX = Kp * absMuX >= Math.PI, wholeY = Kp * absMuY >= Math.PI;
            let cLx = 1, sLx = 0, cLy = 1, sLy = 0;
            if (!wholeX || !wholeY) {
              if (rotCount <= Kp) rotCount = rotations(tx.muEff, ty.muEff, kTop);
              const R = SCRATCH.rot;
              cLx = R[4 * Kp]; sLx = R[4 * Kp + 1]; cLy = R[4 * Kp + 2]; sLy = R[4 * Kp + 3];
            }
            const E2 = 0.5 * e2, E3 = (e2 * e) / 6;
            const DX1 = SCRATCH.dx1, DX2 = SCRATCH.dx2, DY1 = SCRATCH.dy1, DY2 = SCRATCH.dy2;
            DX1[0] = cx1; DX2[0] = cx2; DY1[0] = cy1; DY2[0] = cy2;
            let kd = 1; // d_k known for k < kd
            const m11x = tx.m11, m12x = tx.m12, m21x = tx.m21, m22x = tx.m22;
            const m11y = ty.m11, m12y = ty.m12, m21y = ty.m21, m22y = ty.m22;
            for (let left = nc; left > 0 && hitAt < 0; left--) {
              // The remaining candidate of largest envelope, swapped to the end of the live part.
              let best = 0;
              for (let q2 = 1; q2 < left; q2++) if (env[q2] > env[best]) best = q2;
              const m = cand[best];
              cand[best] = cand[left - 1]; env[best] = env[left - 1];
              let ii = i0 + m * S;
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
                // ρ = L⁻ᵀ·row; C = ρ·z = |ρ||z|cos a, Sv = ρ×z = |ρ||z|sin a at k = 0; the arc's far
                // end by the rotation through Kp·μ; U² ≤ max(C², C_end²) unless sin changes sign.
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
                // Margin for the invariant's drift under the (non-symplectic) RK4 table (≲ 1e-12
                // per period) and for rounding in the rotation: 1e-6 relative.
                if ((bxm + bym) * (1 + 1e-6) < R2) continue;
              }
              // Every period whose check m lies inside the rods: base + m ≤ full.
              for (let kk = 0; kk * M + m <= full; kk++) {
                if (kk === kd) {
                  const o = kk - 1;
                  DX1[kk] = m11x * DX1[o] + m12x * DX2[o]; DX2[kk] = m21x * DX1[o] + m22x * DX2[o];
                  DY1[kk] = m11y * DY1[o] + m12y * DY2[o]; DY2[kk] = m21y * DY1[o] + m22y * DY2[o];
                  kd++;
                }
                const Xc = r1 * DX1[kk] + r2 * DX2[kk], Yc = t1 * DY1[kk] + t2 * DY2[kk];
                if (Xc * Xc + Yc * Yc >= R2) { hitAt = kk * M + m; break; }
              }
            }
          }
          if (hitAt < 0) {
            // The exit check (the shortened last step of the direct kernel): F(θr)·M0^K·c.
            const thEnd = psi + omega * tExit;
            let K = Math.floor(thEnd / TWO_PI);
            let thr = thEnd - K * TWO_PI;
            if (thr >= TWO_PI) { thr -= TWO_PI; K++; }
            if (thr < 0) thr = 0;
            const Fm = this.fm;
            powerApply(tx, K, cx1, cx2, v);
            fAt(tx, thr, Fm);
            const Xe = Fm.a11 * v[0] + Fm.a12 * v[1];
            powerApply(ty, K, cy1, cy2, v);
            fAt(ty, thr, Fm);
            const Ye = Fm.a11 * v[0] + Fm.a12 * v[1];
            if (Xe * Xe + Ye * Ye >= R2) hitAt = full;
          }
          this.periodLoops++;
          if (hitAt >= 0) {
            fate[j] = Fate.hit;
            done[j] = 1;
            continue;
          }
        } else this.envelopeCleared++;
        // Cleared for the whole stage: out at zEnd at tExit, then the open drifts (openDrifts()).
        let t = tExit, z = zEnd, f: number = Fate.detected;
        for (let q = s0 + 1; q < stages.length; q++) {
          const te = (stages[q].zEnd - z) / vz, tl = maxTime - t;
          if (tl < te) { t += tl; f = Fate.alive; break; }
          t += te; z = stages[q].zEnd;
        }
        fate[j] = f;
        done[j] = 1;
      }
      k = end;
    }
    return done;
  }

  /** Tiers 2–3 of a quadrupole stage (see the file head); Exit.hit, or 0 when no check hits. */
  private periods(tx: PeriodTable, ty: PeriodTable, c: IonCursor, cx1: number, cx2: number, cy1: number, cy2: number,
    envX: number, envY: number, full: number, i0: number, eps: number, qx1: number, qx2: number, qy1: number, qy2: number,
    tEntry: number, h: number, z: number, vz: number, r0: number): ExitCode | 0 {
    const M = tx.checks, R2 = this.r2, g = 1 + ENVELOPE_MARGIN;
    this.periodLoops++;
    // Tiers 2–3, period by period. Upper bound per axis: U² ≤ min(d·E·d, envelope) (the row
    // curve's ellipse, transfer-matrix.ts). Where it reaches r0², four probe checks (m = M, M/2,
    // M/4, 3M/4) look for a sample at or past the electrodes: any check sample ≥ r0² decides a
    // loss, so a growing ion is caught without scanning. The full scan of every check of the
    // flagged periods runs only if no probe hits (ions that come close and pass).
    const ax11 = g * tx.e11, ax12 = 2 * g * tx.e12, ax22 = g * tx.e22;
    const ay11 = g * ty.e11, ay12 = 2 * g * ty.e12, ay22 = g * ty.e22;
    const stamp = ++SCRATCH.stamp;
    const probes = this.probes(M);
    let dx1 = cx1, dx2 = cx2, dy1 = cy1, dy2 = cy2;
    // With an unstable axis, skip the periods in which even the eigen-bound
    // |U| ≤ |A|h1|λ|^(k+1) + |B|h2|λ|^−k (stable axis: its envelope) stays below r0: a scalar
    // recursion, then one jump d ← M0^k c by repeated squaring.
    let base0 = 0;
    if (!tx.stable || !ty.stable) {
      const k = this.quietPeriods(tx, cx1, cx2, envX, ty, cy1, cy2, envY, Math.ceil(full / M), R2);
      if (k > 0) {
        base0 = k * M;
        const v = this.v;
        powerApply(tx, k, cx1, cx2, v); dx1 = v[0]; dx2 = v[1];
        powerApply(ty, k, cy1, cy2, v); dy1 = v[0]; dy2 = v[1];
      }
    }
    let nx = Math.min(envX, ax11 * dx1 * dx1 + ax12 * dx1 * dx2 + ax22 * dx2 * dx2);
    let ny = Math.min(envY, ay11 * dy1 * dy1 + ay12 * dy1 * dy2 + ay22 * dy2 * dy2);
    let pend = -1, px1 = 0, px2 = 0, py1 = 0, py2 = 0;
    const cand = SCRATCH.cand;
    let nc = 0;
    for (let pass = 0; pass < 2; pass++) {
      for (let base = pass === 0 ? base0 : pend; base < full; base += M) {
        // Checks past 2π within period k use rows times M0, i.e. d_{k+1}: bound with both.
        const ex1 = tx.m11 * dx1 + tx.m12 * dx2, ex2 = tx.m21 * dx1 + tx.m22 * dx2;
        const ey1 = ty.m11 * dy1 + ty.m12 * dy2, ey2 = ty.m21 * dy1 + ty.m22 * dy2;
        const nxn = Math.min(envX, ax11 * ex1 * ex1 + ax12 * ex1 * ex2 + ax22 * ex2 * ex2);
        const nyn = Math.min(envY, ay11 * ey1 * ey1 + ay12 * ey1 * ey2 + ay22 * ey2 * ey2);
        if ((nx > nxn ? nx : nxn) + (ny > nyn ? ny : nyn) >= R2) {
          const mmax = Math.min(M, full - base);
          if (pass === 0) {
            if (mmax === M) {
              const X = qx1 * ex1 + qx2 * ex2, Y = qy1 * ey1 + qy2 * ey2;
              if (X * X + Y * Y >= R2) return this.hitAt(c, tEntry, base + M, h, X * r0, Y * r0, z, vz);
            }
            for (let j = 1; j < probes.length; j++) {
              const m = probes[j];
              if (m > mmax) continue;
              if (SCRATCH.rowStamp[m] !== stamp) this.fillRow(tx, ty, m, i0, eps, stamp);
              const X = SCRATCH.rx1[m] * dx1 + SCRATCH.rx2[m] * dx2, Y = SCRATCH.ry1[m] * dy1 + SCRATCH.ry2[m] * dy2;
              if (X * X + Y * Y >= R2) return this.hitAt(c, tEntry, base + m, h, X * r0, Y * r0, z, vz);
            }
            if (pend < 0) { pend = base; px1 = dx1; px2 = dx2; py1 = dy1; py2 = dy2; }
          } else {
            for (let j = 0; j < nc; j++) {
              const m = cand[j];
              if (m > mmax) break;
              const X = SCRATCH.rx1[m] * dx1 + SCRATCH.rx2[m] * dx2, Y = SCRATCH.ry1[m] * dy1 + SCRATCH.ry2[m] * dy2;
              if (X * X + Y * Y >= R2) return this.hitAt(c, tEntry, base + m, h, X * r0, Y * r0, z, vz);
            }
          }
        }
        dx1 = ex1; dx2 = ex2; dy1 = ey1; dy2 = ey2; nx = nxn; ny = nyn;
      }
      if (pend < 0) break;
      // Second pass, from the first flagged period, over the checks that can hit at all. Both
      // axes stable: in Courant–Snyder form X_{k,m} = √Ix·ρx_m·cos(kμx + φx_m), so at check m
      // of ANY period X² + Y² ≤ Ix·Wx_m + Iy·Wy_m, W_m = r_m·Q⁻¹·r_m for the ion's own rows;
      // only the checks where that reaches r0² are visited. Otherwise every check.
      nc = 0;
      const ixx = tx.stable ? tx.gamma * cx1 * cx1 + 2 * tx.alpha * cx1 * cx2 + tx.beta * cx2 * cx2 : 0;
      const iyy = ty.stable ? ty.gamma * cy1 * cy1 + 2 * ty.alpha * cy1 * cy2 + ty.beta * cy2 * cy2 : 0;
      for (let m = 1; m <= M; m++) {
        if (SCRATCH.rowStamp[m] !== stamp) this.fillRow(tx, ty, m, i0, eps, stamp);
        if (tx.stable && ty.stable) {
          const a1 = SCRATCH.rx1[m], a2 = SCRATCH.rx2[m], b1 = SCRATCH.ry1[m], b2 = SCRATCH.ry2[m];
          const wx = tx.beta * a1 * a1 - 2 * tx.alpha * a1 * a2 + tx.gamma * a2 * a2;
          const wy = ty.beta * b1 * b1 - 2 * ty.alpha * b1 * b2 + ty.gamma * b2 * b2;
          // Margin for the invariant's drift under the (non-symplectic) RK4 table, ≲ 1e-12 per period.
          if ((ixx * wx + iyy * wy) * (1 + 1e-6) < R2) continue;
        }
        cand[nc++] = m;
      }
      if (nc === 0) break;
      dx1 = px1; dx2 = px2; dy1 = py1; dy2 = py2;
      nx = Math.min(envX, ax11 * dx1 * dx1 + ax12 * dx1 * dx2 + ax22 * dx2 * dx2);
      ny = Math.min(envY, ay11 * dy1 * dy1 + ay12 * dy1 * dy2 + ay22 * dy2 * dy2);
    }
    return 0;
  }

  private quadrupole(s: number, pop: number, st: QuadrupoleStage, c: IonCursor): ExitCode {
    const { x: tx, y: ty } = this.pair(s, pop, st, c.m, c.q);
    const M = tx.checks;
    const omega = 2 * Math.PI * st.rf.frequency;
    const h = 1 / st.rf.frequency / M; // the direct kernel's step, so the check times coincide
    const r0 = st.r0, toP = 1 / (r0 * omega);
    const tEntry = c.t, z = c.z, vz = c.vz;
    const TWO_PI = 2 * Math.PI;
    const th0 = omega * (tEntry + c.tau) + st.rf.phase;
    let psi = th0 - TWO_PI * Math.floor(th0 / TWO_PI);
    if (psi >= TWO_PI) psi -= TWO_PI;
    const tExit = vz > 0 ? (st.zEnd - z) / vz : vz < 0 ? (st.zStart - z) / vz : Infinity;
    const tLeft = this.ctx.maxTime - tEntry;
    const leaves = tExit <= tLeft;
    const span = leaves ? tExit : tLeft;
    const full = Math.floor(span / h);
    const R2 = this.r2;

    // c = F(ψ)⁻¹ w per axis (det F = 1 up to rounding; the adjugate over det keeps it exact).
    const i0 = Math.min(tx.n - 1, Math.floor(psi / tx.dTheta));
    const eps = psi - i0 * tx.dTheta;
    const { ch, sh, ce, se } = smallAngle(eps);
    const F = this.fm;
    const X0 = c.x / r0, PX0 = c.vx * toP, Y0 = c.y / r0, PY0 = c.vy * toP;
    fAtGrid(tx, i0, eps, ch, sh, ce, se, F);
    let det = F.a11 * F.a22 - F.a12 * F.a21;
    let cx1 = (F.a22 * X0 - F.a12 * PX0) / det, cx2 = (-F.a21 * X0 + F.a11 * PX0) / det;
    // First rows of F(ψ): the check at the end of period k (m = M) is X = row·d_{k+1}.
    const qx1 = F.a11, qx2 = F.a12;
    fAtGrid(ty, i0, eps, ch, sh, ce, se, F);
    const qy1 = F.a11, qy2 = F.a12;
    det = F.a11 * F.a22 - F.a12 * F.a21;
    let cy1 = (F.a22 * Y0 - F.a12 * PY0) / det, cy2 = (-F.a21 * Y0 + F.a11 * PY0) / det;

    // Tier 1: all-time envelope per stable axis, U² ≤ I·Wmax (with the grid margin).
    const g = 1 + ENVELOPE_MARGIN;
    const envX = tx.stable ? g * tx.wMax * (tx.gamma * cx1 * cx1 + 2 * tx.alpha * cx1 * cx2 + tx.beta * cx2 * cx2) : Infinity;
    const envY = ty.stable ? g * ty.wMax * (ty.gamma * cy1 * cy1 + 2 * ty.alpha * cy1 * cy2 + ty.beta * cy2 * cy2) : Infinity;
    const safe = envX + envY < R2;
    if (safe) this.envelopeCleared++;
    else if (full > 0) {
      const code = this.periods(tx, ty, c, cx1, cx2, cy1, cy2, envX, envY, full, i0, eps, qx1, qx2, qy1, qy2, tEntry, h, z, vz, r0);
      if (code !== 0) return code;
    }

    const zEnd = leaves ? (vz > 0 ? st.zEnd : st.zStart) : z + span * vz;
    // Tier 1 cannot hit at the exit either; when no later stage looks at x, y (no RF stage, no
    // finite aperture downstream; vz is constant in a linear scene) the exit state is not needed.
    if (safe && leaves && !(vz > 0 ? this.needAfter[s] : this.needBefore[s])) {
      storeCursor(c, tEntry + span, c.x, c.y, zEnd, c.vx, c.vy, vz, full);
      return vz > 0 ? Exit.forward : Exit.backward;
    }
    // State at the end of the span: F(θr)·M0^K·c with θ_end = ψ + Ω·span = θr + 2πK.
    const thEnd = psi + omega * span;
    let K = Math.floor(thEnd / TWO_PI);
    let thr = thEnd - K * TWO_PI;
    if (thr >= TWO_PI) { thr -= TWO_PI; K++; }
    if (thr < 0) thr = 0;
    const v = this.v;
    powerApply(tx, K, cx1, cx2, v); cx1 = v[0]; cx2 = v[1];
    fAt(tx, thr, F);
    const X = F.a11 * cx1 + F.a12 * cx2, PX = F.a21 * cx1 + F.a22 * cx2;
    powerApply(ty, K, cy1, cy2, v); cy1 = v[0]; cy2 = v[1];
    fAt(ty, thr, F);
    const Y = F.a11 * cy1 + F.a12 * cy2, PY = F.a21 * cy1 + F.a22 * cy2;
    storeCursor(c, tEntry + span, X * r0, Y * r0, zEnd, PX / toP, PY / toP, vz, full);
    if (X * X + Y * Y >= R2) return Exit.hit;
    if (!leaves) return Exit.time;
    return vz > 0 ? Exit.forward : Exit.backward;
  }
}
