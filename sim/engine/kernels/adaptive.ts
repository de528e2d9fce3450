// RF stages with the adaptive Dormand–Prince 5(4) integrator (sim/integrate/dopri5.ts; Hairer,
// Nørsett & Wanner, Solving ODEs I, §II.4–II.6) instead of fixed-step RK4: `integrator: dopri5`
// with `tolerance` (relative; absolute tolerance scaled to the electrode size). Same fields as
// quadrupole.ts and trap.ts, with cos evaluated directly (steps are not commensurate with the RF
// period). History samples come from the dense output at the grid times.

import type { QuadrupoleStage, TrapStage } from '../../scene/types.js';
import { Dopri5 } from '../../integrate/dopri5.js';
import type { Derivative } from '../../integrate/derivative.js';
import { Exit, storeCursor, type ExitCode, type IonCursor, type StepContext } from '../context.js';

const y = new Float64Array(6);

export function trackAdaptive(st: QuadrupoleStage | TrapStage, c: IonCursor, ctx: StepContext, tolerance: number): ExitCode {
  const omega = 2 * Math.PI * st.rf.frequency;
  const period = 1 / st.rf.frequency;
  const zc = st.type === 'trap' ? 0.5 * (st.zStart + st.zEnd) : 0;
  let f: Derivative;
  if (st.type === 'quadrupole') {
    const k = (2 * c.q) / (c.m * st.r0 * st.r0);
    const U = st.dc, V = st.rf.amplitude, ph = omega * c.tau + st.rf.phase;
    f = (t, s, d) => {
      const g = k * (U + V * Math.cos(omega * t + ph));
      d[0] = s[3]; d[1] = s[4]; d[2] = s[5];
      d[3] = -g * s[0]; d[4] = g * s[1]; d[5] = 0;
    };
  } else {
    const k = (2 * c.q) / (c.m * (st.r0 * st.r0 + 2 * st.z0 * st.z0));
    const U = st.dc, V0 = st.rf.amplitude, ph = omega * c.tau + st.rf.phase;
    const ramp = st.rf.ramp;
    const rate = ramp ? (ramp.to - V0) / ramp.over : 0;
    const aux = st.aux;
    const kA = aux ? (c.q * aux.amplitude) / (2 * st.z0 * c.m) : 0;
    const wA = aux ? 2 * Math.PI * aux.frequency : 0, phA = aux ? aux.phase : 0;
    f = (t, s, d) => {
      const V = ramp ? (t >= ramp.over ? ramp.to : V0 + rate * t) : V0;
      const g = k * (U + V * Math.cos(omega * t + ph));
      d[0] = s[3]; d[1] = s[4]; d[2] = s[5];
      d[3] = -g * s[0]; d[4] = -g * s[1]; d[5] = 2 * g * s[2] + (aux ? kA * Math.cos(wA * t + phA) : 0);
    };
  }
  const scale = st.r0;
  const solver = new Dopri5(6, { rtol: tolerance, atol: tolerance * scale * 1e-3, maxStep: period / 8, maxSteps: 1e9 });
  y[0] = c.x; y[1] = c.y; y[2] = c.z - zc; y[3] = c.vx; y[4] = c.vy; y[5] = c.vz;
  let tEnd = ctx.maxTime;
  // In the quadrupole vz is constant: the exit time is known, integrate exactly to it.
  if (st.type === 'quadrupole') {
    const tExit = c.vz > 0 ? (st.zEnd - c.z) / c.vz : c.vz < 0 ? (st.zStart - c.z) / c.vz : Infinity;
    tEnd = Math.min(ctx.maxTime, c.t + tExit);
  }
  let code: ExitCode = Exit.time;
  let steps = 0;
  const r0sq = st.r0 * st.r0;
  const z0sq2 = st.type === 'trap' ? 2 * st.z0 * st.z0 : 0;
  const ap2 = st.type === 'trap' ? st.aperture * st.aperture : 0;
  const hist = ctx.hist;
  const rec = ctx.rec;
  let tLast = c.t;
  solver.integrate(f, c.t, y, tEnd, (tPrev, t, s, sol) => {
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
    const r2 = s[0] * s[0] + s[1] * s[1];
    if (st.type === 'quadrupole') {
      if (r2 >= r0sq) { code = Exit.hit; return false; }
    } else {
      const zz2 = 2 * s[2] * s[2];
      if (r2 - zz2 >= r0sq) { code = Exit.hit; return false; }
      if (zz2 - r2 >= z0sq2) { code = r2 >= ap2 ? Exit.hit : s[5] > 0 ? Exit.forward : Exit.backward; return false; }
    }
    return true;
  });
  // Stopped by the observer: at the end of the step that crossed an electrode or end cap.
  const t = code === Exit.time ? tEnd : tLast;
  if (code === Exit.time && st.type === 'quadrupole' && tEnd < ctx.maxTime) code = c.vz > 0 ? Exit.forward : Exit.backward;
  let zOut = y[2] + zc;
  if (st.type === 'quadrupole' && (code === Exit.forward || code === Exit.backward)) zOut = c.vz > 0 ? st.zEnd : st.zStart;
  if (st.type === 'trap' && (code === Exit.forward || code === Exit.backward)) {
    // Through the end-cap hole: field-free to the stage boundary, as in trap.ts.
    const zb = y[5] > 0 ? st.zEnd : st.zStart;
    const dt = (zb - zOut) / y[5];
    storeCursor(c, t + dt, y[0] + y[3] * dt, y[1] + y[4] * dt, zb, y[3], y[4], y[5], steps);
    return code;
  }
  storeCursor(c, t, y[0], y[1], zOut, y[3], y[4], y[5], steps);
  return code;
}
