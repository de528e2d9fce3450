// Field-free drift and uniform axial field (acceleration gap), advanced in closed form:
//   z(t) = z + v_z t + a t²/2,  a = qE/m,  E = V/L along +z (the potential falls by V over L);
//   x, y move in straight lines. The crossing time of a boundary solves the quadratic with the
// cancellation-free form of the roots (Press et al., Numerical Recipes, 3rd ed., eq. 5.6.4).
// With gas in the stage the ion is stepped on a fixed step, exact flight between gas events.

import type { AccelerateStage } from '../accelerate/stage.js';
import type { DriftStage } from '../drift/stage.js';
import { Exit, observe, storeCursor, type ExitCode, type IonCursor, type StepContext } from '../../core/cursor.js';

/** Smallest t > 0 with z + v t + a t²/2 = zb, or Infinity. */
export function crossingTime(z: number, v: number, a: number, zb: number): number {
  const c = z - zb;
  if (a === 0) {
    if (v === 0) return Infinity;
    const t = -c / v;
    return t > 0 ? t : Infinity;
  }
  const A = 0.5 * a, B = v;
  const disc = B * B - 4 * A * c;
  if (disc < 0) return Infinity;
  const sq = Math.sqrt(disc);
  const qq = -0.5 * (B + (B >= 0 ? sq : -sq));
  const r1 = qq / A;
  const r2 = qq !== 0 ? c / qq : -B / A;
  let t = Infinity;
  if (r1 > 0) t = r1;
  if (r2 > 0 && r2 < t) t = r2;
  return t;
}

/** Smallest t > 0 with |(x + vx t, y + vy t)| = R, or Infinity. */
function wallTime(x: number, y: number, vx: number, vy: number, R: number): number {
  if (!Number.isFinite(R)) return Infinity;
  const A = vx * vx + vy * vy;
  if (A === 0) return Infinity;
  const B = 2 * (x * vx + y * vy);
  const C = x * x + y * y - R * R;
  const disc = B * B - 4 * A * C;
  if (disc < 0) return Infinity;
  const t = (-B + Math.sqrt(disc)) / (2 * A);
  return t > 0 ? t : Infinity;
}

export function trackUniform(st: DriftStage | AccelerateStage, c: IonCursor, ctx: StepContext, gasStep: number): ExitCode {
  const a = st.type === 'accelerate' ? (c.q * st.voltage) / (st.length * c.m) : 0;
  if (st.aperture * st.aperture <= c.x * c.x + c.y * c.y) return Exit.hit;
  if (ctx.gasField !== null) return trackUniformDrag(st, c, ctx, gasStep, a * c.m / c.q);
  const gas = ctx.gas;
  for (;;) {
    const tf = crossingTime(c.z, c.vz, a, st.zEnd);
    const tb = crossingTime(c.z, c.vz, a, st.zStart);
    const tExit = Math.min(tf, tb);
    const tWall = wallTime(c.x, c.y, c.vx, c.vy, st.aperture);
    const tLeft = ctx.maxTime - c.t;
    let dt = Math.min(tExit, tWall, tLeft);
    const stepped = gas !== null && dt > gasStep;
    if (stepped) dt = gasStep;
    sampleHistory(c, ctx, a, dt);
    if (ctx.rec !== null && ctx.recordSpacing !== undefined) recordInside(c, ctx, a, dt, ctx.recordSpacing);
    const t1 = c.t + dt;
    const x = c.x + c.vx * dt, y = c.y + c.vy * dt;
    let z = c.z + dt * (c.vz + 0.5 * a * dt);
    const vz = c.vz + a * dt;
    let code: ExitCode | 0 = 0;
    if (!stepped) {
      if (dt === tWall && tWall < tExit) code = Exit.hit;
      else if (dt === tLeft && tLeft < tExit) code = Exit.time;
      else if (tf <= tb) { z = st.zEnd; code = Exit.forward; }
      else { z = st.zStart; code = Exit.backward; }
    }
    storeCursor(c, t1, x, y, z, c.vx, c.vy, vz, 1);
    if (code !== 0) return code;
    if (ctx.rec !== null) observe(c, ctx, 1);
    const b = ctx.batch, i = c.slot;
    b.vx[i] = c.vx; b.vy[i] = c.vy; b.vz[i] = c.vz;
    gas!(b, i, dt);
    c.vx = b.vx[i]; c.vy = b.vy[i]; c.vz = b.vz[i];
  }
}

/**
 * Trajectory points at t + k·spacing inside (t, t + dt), from the closed-form motion; the cursor
 * is not touched, so the ion's flight and end state are the same with or without them.
 */
function recordInside(c: IonCursor, ctx: StepContext, a: number, dt: number, spacing: number): void {
  const rec = ctx.rec!;
  const n = Math.min(100_000, Math.ceil(dt / spacing) - 1);
  for (let k = 1; k <= n; k++) {
    const s = k * spacing;
    rec.push(c.ion, c.t + s, c.x + c.vx * s, c.y + c.vy * s, c.z + s * (c.vz + 0.5 * a * s), c.vx, c.vy, c.vz + a * s);
  }
}

/** History points that fall inside (t, t + dt], from the closed-form motion. */
function sampleHistory(c: IonCursor, ctx: StepContext, a: number, dt: number): void {
  const h = ctx.hist;
  if (h === null) return;
  while (c.nextHist < h.points) {
    const tk = h.timeOf(c.nextHist);
    if (tk > c.t + dt) break;
    const s = Math.max(0, tk - c.t);
    h.add(c.nextHist, c.m, c.x + c.vx * s, c.y + c.vy * s, c.z + s * (c.vz + 0.5 * a * s), c.vx, c.vy, c.vz + a * s);
    c.nextHist++;
  }
}

/**
 * Drag gas in a uniform field: the exact Ornstein–Uhlenbeck step of sim/gas/drag.ts moves the ion
 * (field included), so the stage only checks the boundaries after each step.
 */
function trackUniformDrag(st: DriftStage | AccelerateStage, c: IonCursor, ctx: StepContext, h: number, ez: number): ExitCode {
  const b = ctx.batch, i = c.slot;
  const step = ctx.gasField!;
  const ap2 = st.aperture * st.aperture;
  b.x[i] = c.x; b.y[i] = c.y; b.z[i] = c.z; b.vx[i] = c.vx; b.vy[i] = c.vy; b.vz[i] = c.vz;
  let code: ExitCode = Exit.time;
  for (;;) {
    const dt = Math.min(h, ctx.maxTime - c.t);
    if (!(dt > 0)) { code = Exit.time; break; }
    step(b, i, dt, 0, 0, ez);
    storeCursor(c, c.t + dt, b.x[i], b.y[i], b.z[i], b.vx[i], b.vy[i], b.vz[i], 1);
    if (c.x * c.x + c.y * c.y >= ap2) { code = Exit.hit; break; }
    if (c.z >= st.zEnd) { code = Exit.forward; break; }
    if (c.z < st.zStart) { code = Exit.backward; break; }
    observe(c, ctx, 1);
  }
  return code;
}
