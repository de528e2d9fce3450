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
// The common layout (ions start in a quadrupole followed only by open drifts, start draws reused,
// fates only: a sweep) runs first through the batch pass (batch-pass.ts), which decides nearly
// every ion from interpolated spectral rows (growing axes) or Courant–Snyder rows (stable ones),
// each with its error bound, and scans the candidate checks of the rest; whatever it cannot
// decide goes through the per-ion code above. Both use the same checks.
// A loss is decided by a check sample at or past r0 (the same samples as the direct kernel); the
// hit time reported is that sample's, which for probe-caught ions may be a little after the first.
// The exit state is F(θ_exit mod 2π)·M0^K·c with M0^K by repeated squaring.

import type { DriftStage, QuadrupoleStage, Scene } from '../scene/types.js';
import { allocateBatch, Fate, type IonBatch } from '../core/batch.js';
import { Exit, storeCursor, type ExitCode, type IonCursor, type StepContext } from '../core/cursor.js';
import { populationOffsets, referenceOmega, startIon } from '../engine/start.js';
import { ELEMENTARY_CHARGE, ionMassKg } from '../units/constants.js';
import { trackUniform } from '../stages/shared/uniform-kernel.js';
import { ENVELOPE_MARGIN, fAt, fAtGrid, mat2, periodTable, powerApply, releaseSpectral, releaseTwiss, rowAt, smallAngle, type PeriodTable } from './transfer-matrix.js';
import { batchRun, quietPeriods, type BatchCounts, type Run } from './batch-pass.js';
import { hasRf, kindOf } from '../stages/registry.js';
import { filterAxisQA } from '../mathieu/parameters.js';
import { isOpenDrift, isQuadrupole } from '../stages/guards.js';
import { blockedOnEntry, entranceRadius, exitRadius, throughExitPlate } from '../stages/quadrupole/apertures.js';
import { detectorOf, missesDetector } from '../scene/detector.js';


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
    const stage = scene.stages[i];
    const kind = kindOf(stage);
    // The kind says which resolved keys the fast path understands and whether its field is linear.
    const keys = kind.fastPathKeys;
    if (!keys || !kind.field(stage).linear) return `stage ${i} is of type ${String(stage.type)}`;
    const st = stage as unknown as Record<string, unknown>;
    if (st.gas) return `gas in stage ${i}`;
    for (const k of Object.keys(st)) if (!keys.has(k) && st[k] !== undefined) return `stage ${i} sets ${k}`;
    const drive = kind.rf(stage);
    if (drive !== undefined) {
      const rf = drive as unknown as Record<string, unknown>;
      if (rf.ramp) return `RF ramp in stage ${i}`;
      for (const k of Object.keys(rf)) if (!RF_KEYS.has(k) && rf[k] !== undefined) return `stage ${i} rf sets ${k}`;
    }
  }
  return null;
}

export interface LinearOptions {
  /**
   * Loss radius as a multiple of r0 (default 1), and of the entrance and exit holes and the
   * detector alike. Diagnostics only: the tests run 0.95 and 1.05 to find ions whose fate does
   * not hinge on the exact radii.
   */
  radiusScale?: number;
  /** Working memory shared with the other trackers of a sweep (default: the tracker's own). */
  scratch?: LinearScratch;
}

interface AxisPair { x: PeriodTable; y: PeriodTable }

/**
 * Offsets of the doubles quadrupole() hands to periods() in LinearTracker.arg. periods() is too
 * big to be inlined, and a double passed as a call argument is boxed (a heap number per value
 * and ion): a typed array is not. cx, cy: the ion in phase-0 coordinates; env: the tier-1
 * envelopes; eps: offset of the entry phase from its grid point; qx, qy: first rows of F(ψ);
 * the entry time, step, entry z, vz and r0 for the hit state.
 */
const enum Arg { cx1, cx2, cy1, cy2, envX, envY, eps, qx1, qx2, qy1, qy2, tEntry, h, z, vz, r0, count }

/**
 * Working memory of the trackers of one sweep (or of one test), made by whoever runs them and
 * handed to each LinearTracker of the run. A sweep makes a tracker per point; keeping these here
 * saves it the allocation (and collection) of the arrays at every point and lets a point start
 * from what the previous one learnt. Trackers sharing one never run at once: track() runs start
 * to end without yielding. Fates do not depend on what it holds (buffers are overwritten before
 * they are read; the hint only orders work).
 */
export class LinearScratch {
  /** The one-ion batch that startIon fills and the drift kernel reads. */
  readonly oneIon: IonBatch = allocateBatch(1);
  /** The current ion's sampled first rows of F per axis at check m, stamped per ion (rowStamp[m] === stamp). */
  rx1 = new Float64Array(0); rx2 = new Float64Array(0); ry1 = new Float64Array(0); ry2 = new Float64Array(0);
  rowStamp = new Float64Array(0);
  stamp = 0;
  /** Candidate checks of the per-ion scan. */
  cand = new Int32Array(0);
  /** The batch pass's done mask, per ion of a track() call. */
  doneMask = new Uint8Array(0);
  /**
   * The axis (0 = x, 1 = y) that was the growing one at the last point the batch pass saw: in an
   * m/z sweep the next point is likely the same, so its table is built first. Speed only.
   */
  growingHint = 0;
  /** Tables of finished trackers, whose arrays the next point's tables reuse. */
  readonly spareTables: PeriodTable[] = [];

  /** Room for the rows and candidates of checks 1..M (fresh stamps are 0, which no ion's is). */
  rows(M: number): void {
    if (this.rx1.length >= M + 1) return;
    this.rx1 = new Float64Array(M + 1); this.rx2 = new Float64Array(M + 1);
    this.ry1 = new Float64Array(M + 1); this.ry2 = new Float64Array(M + 1);
    this.rowStamp = new Float64Array(M + 1);
    this.cand = new Int32Array(M + 1);
  }
}

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
  /** The radii's factor (LinearOptions.radiusScale) and the detector radius with it applied, m. */
  private readonly scale: number;
  private readonly detector: number;
  /** Whether a stage after (before) stage s looks at the transverse state. */
  private readonly needAfter: boolean[];
  private readonly needBefore: boolean[];
  private readonly openTail: boolean[];
  private readonly offsets: number[];
  private readonly sc: LinearScratch;
  private readonly b: IonBatch;
  private readonly ctx: StepContext;
  private readonly c: IonCursor = { ion: 0, slot: 0, m: 0, q: 0, tau: 0, t: 0, x: 0, y: 0, z: 0, vx: 0, vy: 0, vz: 0, steps: 0, sinceRecord: 0, nextHist: 0 };
  // Scratch: a matrix, a vector (the row scratch is the sweep's, see LinearScratch).
  private readonly row = new Float64Array(2);
  private readonly fm = mat2();
  private readonly v = new Float64Array(2);
  private readonly arg = new Float64Array(Arg.count);
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
    this.scale = s;
    this.detector = s * detectorOf(scene).radius;
    this.sc = opts.scratch ?? new LinearScratch();
    this.b = this.sc.oneIon;
    this.offsets = populationOffsets(scene);
    const looks = scene.stages.map((st) => hasRf(st) || Number.isFinite((st as DriftStage).aperture));
    // A finite detector looks at x, y in the last exit plane, after every stage.
    const detects = Number.isFinite(this.detector);
    this.needAfter = looks.map((_, s) => detects || looks.slice(s + 1).some(Boolean));
    this.needBefore = looks.map((_, s) => looks.slice(0, s).some(Boolean));
    // Stage s is followed only by drifts without aperture or gas (vz > 0 there stays > 0).
    this.openTail = scene.stages.map((_, s) => s < scene.stages.length - 1
      && scene.stages.slice(s + 1).every(isOpenDrift));
    this.ctx = { batch: this.b, maxTime: scene.run.maxTime, recordEvery: 0, rec: null, hist: null, gas: null, gasField: null };
    // Read once: a sweep's scene objects are spread copies whose hidden classes vary, and a
    // load through one in the batch pass would deoptimize it.
    this.stages = scene.stages;
    this.popCount = scene.ions.length;
    this.stepsPerCycle = scene.run.stepsPerCycle;
  }

  private readonly stages: Scene['stages'];
  private readonly popCount: number;
  private readonly stepsPerCycle: number;

  /**
   * Fate codes (Fate.detected / hit / alive) of global ions start..start+count−1 into `fate`.
   * With `starts` (drawn for this scene or one it serves, see StartStates) the draws are reused.
   */
  track(start: number, count: number, fate: Int8Array, endTime?: Float64Array, starts?: StartStates): void {
    const scene = this.scene, b = this.b, c = this.c;
    const cached = starts !== undefined && starts.serves(scene) ? starts : null;
    // Per population; typed arrays, so that a factor of exactly 1 (the point the draws were made
    // at) does not give the array another elements kind than the other points' (a deopt).
    const n = scene.ions.length;
    const scale = new Float64Array(n), mass = new Float64Array(n), charge = new Float64Array(n);
    for (let p = 0; p < n; p++) {
      const pop = scene.ions[p];
      mass[p] = ionMassKg(pop.mz, pop.charge);
      charge[p] = pop.charge * ELEMENTARY_CHARGE;
      if (cached) scale[p] = Math.sqrt(cached.mass[p] / mass[p]);
    }
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
        const code = isQuadrupole(st)
          ? this.quadrupole(s, pop, st, c)
          : trackUniform(st as DriftStage, c, this.ctx, scene.run.stepNoRf);
        if (code === Exit.hit) { f = Fate.hit; break; }
        if (code === Exit.time) { f = Fate.alive; break; }
        if (code === Exit.forward) {
          if (s === scene.stages.length - 1) { f = missesDetector(c.x, c.y, this.detector) ? Fate.missed : Fate.detected; break; }
          if (this.openTail[s]) { f = this.openDrifts(s + 1, c); break; }
          s++;
        } else {
          if (s === 0) { f = Fate.returned; break; }
          s--;
        }
      }
      fate[k] = f;
      if (endTime) endTime[k] = c.t;
    }
  }

  /**
   * The table of one axis (0 = x, 1 = y) of stage s for population pop, built on first use: the
   * batch pass often decides a point from its growing axis alone.
   */
  private axisTable(s: number, pop: number, st: QuadrupoleStage, m: number, q: number, axis: number): PeriodTable {
    const key = s * this.popCount + pop;
    let p = this.halves.get(key);
    if (!p) { p = [null, null]; this.halves.set(key, p); }
    let t = p[axis];
    if (t === null) {
      // Mathieu a, q of the x axis for this ion (DESIGN.md; q carries the charge's sign).
      const { a, q: qq } = filterAxisQA(st.r0, st.rf.frequency, st.dc, st.rf.amplitude, q, m);
      const sg = axis === 0 ? 1 : -1;
      t = periodTable(sg * a, sg * qq, this.stepsPerCycle, undefined, this.sc.spareTables.pop());
      p[axis] = t;
    }
    return t;
  }

  private readonly halves = new Map<number, [PeriodTable | null, PeriodTable | null]>();

  private pair(s: number, pop: number, st: QuadrupoleStage, m: number, q: number): AxisPair {
    const key = s * this.popCount + pop;
    let t = this.tables.get(key);
    if (!t) {
      t = { x: this.axisTable(s, pop, st, m, q, 0), y: this.axisTable(s, pop, st, m, q, 1) };
      this.tables.set(key, t);
      this.sc.rows(this.stepsPerCycle);
    }
    return t;
  }

  /**
   * Forward through field-free drifts without apertures to the detector: trackUniform's
   * arithmetic for a = 0, R = ∞ and no gas (crossing time (zEnd − z)/vz, straight lines in x, y;
   * out of time when max_time comes first).
   */
  private openDrifts(from: number, c: IonCursor): number {
    const st = this.scene.stages;
    for (let s = from; s < st.length; s++) {
      const tExit = (st[s].zEnd - c.z) / c.vz;
      const tLeft = this.ctx.maxTime - c.t;
      if (tLeft < tExit) { c.t += tLeft; c.z += tLeft * c.vz; c.x += c.vx * tLeft; c.y += c.vy * tLeft; return Fate.alive; }
      c.t += tExit; c.z = st[s].zEnd; c.x += c.vx * tExit; c.y += c.vy * tExit;
    }
    return missesDetector(c.x, c.y, this.detector) ? Fate.missed : Fate.detected;
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
    for (const p of this.halves.values()) {
      for (const t of p) {
        if (t === null) continue;
        releaseSpectral(t); releaseTwiss(t);
        if (this.sc.spareTables.length < 16) this.sc.spareTables.push(t);
      }
    }
    this.halves.clear();
    this.tables.clear();
  }

  /** Check row m of both axes for the current ion (grid point i0 + m·S, offset eps). */
  private fillRow(tx: PeriodTable, ty: PeriodTable, m: number, i0: number, eps: number, stamp: number): void {
    let i = i0 + m * tx.sub;
    const wrap = i >= tx.n;
    if (wrap) i -= tx.n;
    const r = this.row, sc = this.sc;
    rowAt(tx, i, eps, r);
    let u1 = r[0], u2 = r[1];
    if (wrap) { const w1 = u1 * tx.m11 + u2 * tx.m21; u2 = u1 * tx.m12 + u2 * tx.m22; u1 = w1; }
    sc.rx1[m] = u1; sc.rx2[m] = u2;
    rowAt(ty, i, eps, r);
    u1 = r[0]; u2 = r[1];
    if (wrap) { const w1 = u1 * ty.m11 + u2 * ty.m21; u2 = u1 * ty.m12 + u2 * ty.m22; u1 = w1; }
    sc.ry1[m] = u1; sc.ry2[m] = u2;
    sc.rowStamp[m] = stamp;
  }


  /**
   * The batch pass (batch-pass.ts) over runs of ions of one population starting in one
   * quadrupole stage that only open drifts follow; returns done[k] = 1 for the ions it decided.
   */
  private tier1Batch(start: number, count: number, st0: StartStates, scale: Float64Array, mass: Float64Array, charge: Float64Array, fate: Int8Array): Uint8Array {
    const sc = this.sc;
    if (sc.doneMask.length < count) sc.doneMask = new Uint8Array(count);
    const done = sc.doneMask;
    done.fill(0, 0, count);
    const stages = this.stages;
    const counts: BatchCounts = { envelopeCleared: 0, periodLoops: 0 };
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
      if (st !== null && isQuadrupole(st) && (s0 === stages.length - 1 || this.openTail[s0])) {
        // The axis that grew at the last point first; the other table only when needed.
        const hint = sc.growingHint;
        const first = this.axisTable(s0, pop, st, mass[pop], charge[pop], hint);
        const run: Run = {
          tx: hint === 0 ? first : null, ty: hint === 1 ? first : null,
          stage: st, s0, stages, sc: scale[pop], maxTime: this.ctx.maxTime, R2: this.r2,
          entry2: (this.scale * entranceRadius(st)) ** 2, exit2: (this.scale * exitRadius(st)) ** 2,
          detector2: this.detector * this.detector,
          // The exit state decides a fate only where the exit plate is narrower than the rods, or a
          // finite detector lies beyond further stages or inside the loss radius: an ion that never
          // reached the loss radius s·r0 in the rods (every check, the exit included) is otherwise
          // inside plate and detector, as in the direct engine.
          exitState: exitRadius(st) < st.r0
            || (Number.isFinite(this.detector) && (s0 < stages.length - 1 || this.detector < this.scale * st.r0)),
          complete: (r: Run) => {
            r.tx = this.axisTable(s0, pop, st, mass[pop], charge[pop], 0);
            r.ty = this.axisTable(s0, pop, st, mass[pop], charge[pop], 1);
          },
        };
        batchRun(run, st0, start, k, end, fate, done, counts);
        if (run.tx !== null && run.ty !== null && run.tx.stable !== run.ty.stable) sc.growingHint = run.tx.stable ? 1 : 0;
      }
      k = end;
    }
    this.envelopeCleared += counts.envelopeCleared;
    this.periodLoops += counts.periodLoops;
    return done;
  }

  /** Tiers 2–3 of a quadrupole stage (see the file head); Exit.hit, or 0 when no check hits. */
  private periods(tx: PeriodTable, ty: PeriodTable, c: IonCursor, full: number, i0: number): ExitCode | 0 {
    const a = this.arg;
    const cx1 = a[Arg.cx1], cx2 = a[Arg.cx2], cy1 = a[Arg.cy1], cy2 = a[Arg.cy2], envX = a[Arg.envX], envY = a[Arg.envY];
    const eps = a[Arg.eps], qx1 = a[Arg.qx1], qx2 = a[Arg.qx2], qy1 = a[Arg.qy1], qy2 = a[Arg.qy2];
    const tEntry = a[Arg.tEntry], h = a[Arg.h], z = a[Arg.z], vz = a[Arg.vz], r0 = a[Arg.r0];
    const M = tx.checks, R2 = this.r2, g = 1 + ENVELOPE_MARGIN;
    // The rows and candidates (sized by pair() for M; fillRow writes into these same arrays).
    const sc = this.sc, rx1 = sc.rx1, rx2 = sc.rx2, ry1 = sc.ry1, ry2 = sc.ry2, rowStamp = sc.rowStamp;
    this.periodLoops++;
    // Tiers 2–3, period by period. Upper bound per axis: U² ≤ min(d·E·d, envelope) (the row
    // curve's ellipse, transfer-matrix.ts). Where it reaches r0², four probe checks (m = M, M/2,
    // M/4, 3M/4) look for a sample at or past the electrodes: any check sample ≥ r0² decides a
    // loss, so a growing ion is caught without scanning. The full scan of every check of the
    // flagged periods runs only if no probe hits (ions that come close and pass).
    const ax11 = g * tx.e11, ax12 = 2 * g * tx.e12, ax22 = g * tx.e22;
    const ay11 = g * ty.e11, ay12 = 2 * g * ty.e12, ay22 = g * ty.e22;
    const stamp = ++sc.stamp;
    const probes = this.probes(M);
    let dx1 = cx1, dx2 = cx2, dy1 = cy1, dy2 = cy2;
    // With an unstable axis, skip the periods in which even the eigen-bound
    // |U| ≤ |A|h1|λ|^(k+1) + |B|h2|λ|^−k (stable axis: its envelope) stays below r0: a scalar
    // recursion, then one jump d ← M0^k c by repeated squaring.
    let base0 = 0;
    if (!tx.stable || !ty.stable) {
      const k = quietPeriods(tx, cx1, cx2, envX, ty, cy1, cy2, envY, Math.ceil(full / M), R2);
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
    const cand = sc.cand;
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
              if (rowStamp[m] !== stamp) this.fillRow(tx, ty, m, i0, eps, stamp);
              const X = rx1[m] * dx1 + rx2[m] * dx2, Y = ry1[m] * dy1 + ry2[m] * dy2;
              if (X * X + Y * Y >= R2) return this.hitAt(c, tEntry, base + m, h, X * r0, Y * r0, z, vz);
            }
            if (pend < 0) { pend = base; px1 = dx1; px2 = dx2; py1 = dy1; py2 = dy2; }
          } else {
            for (let j = 0; j < nc; j++) {
              const m = cand[j];
              if (m > mmax) break;
              const X = rx1[m] * dx1 + rx2[m] * dx2, Y = ry1[m] * dy1 + ry2[m] * dy2;
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
        if (rowStamp[m] !== stamp) this.fillRow(tx, ty, m, i0, eps, stamp);
        if (tx.stable && ty.stable) {
          const a1 = rx1[m], a2 = rx2[m], b1 = ry1[m], b2 = ry2[m];
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
    // The kind's entrance and exit plates (sim/stages/quadrupole/apertures.ts), then the rods.
    if (blockedOnEntry(st, c, this.scale)) return Exit.hit;
    const code = this.rods(s, pop, st, c);
    return throughExitPlate(st, c, code, this.scale);
  }

  private rods(s: number, pop: number, st: QuadrupoleStage, c: IonCursor): ExitCode {
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
      const a = this.arg;
      a[Arg.cx1] = cx1; a[Arg.cx2] = cx2; a[Arg.cy1] = cy1; a[Arg.cy2] = cy2; a[Arg.envX] = envX; a[Arg.envY] = envY;
      a[Arg.eps] = eps; a[Arg.qx1] = qx1; a[Arg.qx2] = qx2; a[Arg.qy1] = qy1; a[Arg.qy2] = qy2;
      a[Arg.tEntry] = tEntry; a[Arg.h] = h; a[Arg.z] = z; a[Arg.vz] = vz; a[Arg.r0] = r0;
      const code = this.periods(tx, ty, c, full, i0);
      if (code !== 0) return code;
    }

    const zEnd = leaves ? (vz > 0 ? st.zEnd : st.zStart) : z + span * vz;
    // Tier 1 cannot hit at the exit either; when no later stage looks at x, y (no RF stage, no
    // finite aperture or detector downstream; vz is constant in a linear scene) and the plate of
    // the plane it leaves through is no narrower than the rods, the exit state is not needed.
    const plate = vz > 0 ? exitRadius(st) : entranceRadius(st);
    if (safe && leaves && plate >= r0 && !(vz > 0 ? this.needAfter[s] : this.needBefore[s])) {
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
