// RF stages with the adaptive Dormand–Prince 5(4) integrator (sim/integrate/dopri5.ts; Hairer,
// Nørsett & Wanner, Solving ODEs I, §II.4–II.6) instead of fixed-step RK4: `integrator: dopri5`
// with `tolerance` (relative; absolute tolerance scaled to the electrode size). Each RF kind gives
// its equations of motion and electrode test (quadrupole/adaptive.ts, trap/adaptive.ts) with cos
// evaluated directly (steps are not commensurate with the RF period); this driver integrates,
// samples the history from the dense output at the grid times, and lands the ion on the exit.

import { Dopri5 } from '../../integrate/dopri5.js';
import type { Derivative } from '../../integrate/derivative.js';
import { Exit, storeCursor, type ExitCode, type IonCursor, type StepContext } from '../../core/cursor.js';

/** One RF stage as the adaptive driver needs it, for one ion. */
export interface AdaptiveStage {
  /** Equations of motion in the state (x, y, z − zc, vx, vy, vz), t on the run clock. */
  f: Derivative;
  /** Lab z of the coordinate origin, m. */
  zc: number;
  /** Electrode size, m (absolute tolerance scale) and RF period, s (largest step: an eighth). */
  scale: number;
  period: number;
  /** Integrate up to here (the exit time when it is known in advance, else max_time). */
  tEnd: number;
  /** vz is constant: reaching tEnd before max_time means leaving through an end at zStart/zEnd. */
  exitsAtTEnd: boolean;
  /** Leaving through an end-cap hole: field-free flight from there to the stage boundary. */
  throughCap: boolean;
  zStart: number;
  zEnd: number;
  /**
   * After each step tPrev → t: the exit code when the state crossed an electrode or end cap, else 0
   * (solver.dense is valid during the call, for a kind that looks along the step).
   */
  test(s: Float64Array, tPrev: number, t: number, solver: Dopri5): ExitCode | 0;
  /**
   * Optional, after test() gave `code` for the step tPrev → t: place the ion where the step met
   * the electrode or plane, writing the state into s from the step's dense output (sol.dense) and
   * returning its time. Without it the ion is stopped at the end of that step.
   */
  land?(code: ExitCode, tPrev: number, t: number, s: Float64Array, sol: Dopri5): number;
}

const y = new Float64Array(6);

export function trackAdaptive(a: AdaptiveStage, c: IonCursor, ctx: StepContext, tolerance: number): ExitCode {
  const zc = a.zc;
  const solver = new Dopri5(6, { rtol: tolerance, atol: tolerance * a.scale * 1e-3, maxStep: a.period / 8, maxSteps: 1e9 });
  y[0] = c.x; y[1] = c.y; y[2] = c.z - zc; y[3] = c.vx; y[4] = c.vy; y[5] = c.vz;
  const tEnd = a.tEnd;
  let code: ExitCode = Exit.time;
  let steps = 0;
  const hist = ctx.hist;
  const rec = ctx.rec;
  let tLast = c.t;
  solver.integrate(a.f, c.t, y, tEnd, (tPrev, t, s, sol) => {
    steps++;
    tLast = t;
    if (hist !== null) {
      while (c.nextHist < hist.points && hist.timeOf(c.nextHist) <= t) {
        const tk = hist.timeOf(c.nextHist);
        const at = (i: number) => (tk >= tPrev ? sol.dense(i, tk) : s[i]);
        hist.add(c.nextHist, c.m, at(0), at(1), at(2) + zc, at(3), at(4), at(5));
        c.nextHist++;
      }
    }
    if (rec !== null && ++c.sinceRecord >= ctx.recordEvery) {
      c.sinceRecord = 0;
      rec.push(c.ion, t, s[0], s[1], s[2] + zc, s[3], s[4], s[5]);
    }
    const hit = a.test(s, tPrev, t, sol);
    if (hit !== 0) {
      code = hit;
      if (a.land) tLast = a.land(hit, tPrev, t, s, sol);
      return false;
    }
    return true;
  });
  // Stopped by the observer: at the end of the step that crossed an electrode or end cap.
  const t = code === Exit.time ? tEnd : tLast;
  if (code === Exit.time && a.exitsAtTEnd && tEnd < ctx.maxTime) code = c.vz > 0 ? Exit.forward : Exit.backward;
  let zOut = y[2] + zc;
  if (a.exitsAtTEnd && (code === Exit.forward || code === Exit.backward)) zOut = c.vz > 0 ? a.zEnd : a.zStart;
  if (a.throughCap && (code === Exit.forward || code === Exit.backward)) {
    // Through the end-cap hole: field-free to the stage boundary, as in trap/kernel.ts.
    const zb = y[5] > 0 ? a.zEnd : a.zStart;
    const dt = (zb - zOut) / y[5];
    storeCursor(c, t + dt, y[0] + y[3] * dt, y[1] + y[4] * dt, zb, y[3], y[4], y[5], steps);
    return code;
  }
  storeCursor(c, t, y[0], y[1], zOut, y[3], y[4], y[5], steps);
  return code;
}
