// What a stage kernel needs besides the ion: limits, recorders, the gas step of the stage.

import type { IonBatch } from './batch.js';

/** Advance ion `slot`'s velocity through gas over dt (see sim/gas); mutates the batch arrays. */
export type GasStep = (batch: IonBatch, slot: number, dt: number) => void;
/** Advance ion `slot`'s position and velocity exactly through drag gas in a uniform field E (V/m). */
export type GasFieldStep = (batch: IonBatch, slot: number, dt: number, ex: number, ey: number, ez: number) => void;

/** How an ion left a stage. */
// `detected`: the ion reached a detector inside the stage (a linear trap's slotted rod) rather than
// leaving through a plane.
export const Exit = { forward: 1, backward: 2, hit: 3, time: 4, detected: 5 } as const;
export type ExitCode = (typeof Exit)[keyof typeof Exit];

/** The moving ion, loaded into locals by each kernel and stored back on exit. */
export interface IonCursor {
  ion: number;
  slot: number;
  m: number;
  q: number;
  /** RF start offset, s: field phase Ω(t + tau) + φ. */
  tau: number;
  t: number;
  x: number; y: number; z: number;
  vx: number; vy: number; vz: number;
  /** Steps integrated so far (for the run's ion-step count). */
  steps: number;
  /** Steps since the last recorded point. */
  sinceRecord: number;
  /** Next history grid index to sample. */
  nextHist: number;
}

/** Where recorded trajectory points go (sim/engine/recorder.ts). */
export interface PointSink {
  push(ion: number, t: number, x: number, y: number, z: number, vx: number, vy: number, vz: number): void;
}

/** The ensemble-history grid kernels sample (sim/engine/history.ts). */
export interface HistorySink {
  readonly points: number;
  timeOf(k: number): number;
  add(k: number, m: number, x: number, y: number, z: number, vx: number, vy: number, vz: number): void;
}

/** Hard-sphere gas pieces for a stepping loop; `step` is the same physics as a plain GasStep. */
export interface HardSphereKernel {
  /** Ion i's state after enter/collide: remaining optical depth, bound V̂² (m²/s²), ν̂ (1/s). */
  depth: number;
  limit2: number;
  rate: number;
  /** Load ion i's state into depth/limit2/rate (drawn on first use of the slot). */
  enter(batch: IonBatch, i: number): void;
  /**
   * The step of length dt that began with optical depth `depth`, when v² > limit2 or the depth
   * runs out: raises the bound, runs the candidates, updates batch.vx/vy/vz, gasCounter and
   * collisions of ion i, and leaves the new state in depth/limit2/rate.
   */
  collide(batch: IonBatch, i: number, dt: number, depth: number): void;
  /** Store the depth carried in a local back into the per-ion scratch. */
  leave(batch: IonBatch, i: number, depth: number): void;
  step: GasStep;
}

export interface StepContext {
  batch: IonBatch;
  maxTime: number;
  recordEvery: number;
  /** Closed-form stages: record points at this time spacing inside a flight, s (RunSettings.recordSpacing). */
  recordSpacing?: number;
  rec: PointSink | null;
  hist: HistorySink | null;
  /** Gas of the current stage (stage block, else scene block), or null in vacuum. */
  gas: GasStep | null;
  /** Drag model only: exact position-and-velocity step in a uniform field (uniform stages use it). */
  gasField: GasFieldStep | null;
  /** Hard-sphere model: the same physics as `gas`, as pieces a kernel can keep in locals. */
  hardSphere?: HardSphereKernel | null;
}

/** Steps from now until a trajectory point or a history sample is due (Infinity: neither). */
export function stepsToWatch(c: IonCursor, ctx: StepContext, h: number): number {
  let s = Infinity;
  if (ctx.rec !== null) s = ctx.recordEvery - c.sinceRecord;
  const hs = ctx.hist;
  if (hs !== null && c.nextHist < hs.points) {
    s = Math.min(s, Math.max(1, Math.ceil((hs.timeOf(c.nextHist) - c.t) / h - 1e-9)));
  }
  return s;
}

/**
 * After `steps` steps: record the cursor's state if a point is due and sample the history at
 * every grid time passed. Kernels call it only when stepsToWatch says so, so the hot loop pays
 * one integer compare per step.
 */
export function observe(c: IonCursor, ctx: StepContext, steps: number): void {
  if (ctx.rec !== null) {
    c.sinceRecord += steps;
    if (c.sinceRecord >= ctx.recordEvery) {
      c.sinceRecord = 0;
      ctx.rec.push(c.ion, c.t, c.x, c.y, c.z, c.vx, c.vy, c.vz);
    }
  }
  const h = ctx.hist;
  if (h !== null) {
    while (c.nextHist < h.points && h.timeOf(c.nextHist) <= c.t) {
      h.add(c.nextHist, c.m, c.x, c.y, c.z, c.vx, c.vy, c.vz);
      c.nextHist++;
    }
  }
}

/**
 * At max_time: sample the history at every grid time up to the cursor's time (the grid's last
 * point is max_time itself, which the last, shortened step reaches only up to rounding).
 */
export function observeHistoryAtEnd(c: IonCursor, ctx: StepContext): void {
  const h = ctx.hist;
  if (h === null) return;
  while (c.nextHist < h.points && h.timeOf(c.nextHist) <= ctx.maxTime) {
    h.add(c.nextHist, c.m, c.x, c.y, c.z, c.vx, c.vy, c.vz);
    c.nextHist++;
  }
}

/** Write a kernel's locals back into the cursor and count the steps taken. */
export function storeCursor(c: IonCursor, t: number, x: number, y: number, z: number, vx: number, vy: number, vz: number, steps: number): void {
  c.t = t; c.x = x; c.y = y; c.z = z; c.vx = vx; c.vy = vy; c.vz = vz;
  c.steps += steps;
}
