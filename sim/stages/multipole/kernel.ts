// Ideal RF multipole of 2n rods (field.ts): Φ = (U + V cos θ) Re(w^n), w = (x + i y)/r0, so
//   ẍ = −k g(t) Re w^(n−1),  ÿ = +k g(t) Im w^(n−1),  z̈ = 0,   k = q n/(m r0),  g = U + V cos θ
// (Gerlich, Adv. Chem. Phys. 82, 1992, eq. 8 differentiated). Classic RK4 (Hairer, Nørsett &
// Wanner, Solving ODEs I, Table II.1.2) on fixed steps h = T/n_steps, the RF phase from the phase
// table (the ion's phase ψ enters once per stage), w^(n−1) by n − 2 complex multiplications.
// z moves freely between gas events (vz constant), so the exit time is known: the last step is
// shortened to land on the stage end or on max_time (Math.cos there, once per ion and leg).
// Gas: the hard-sphere model as kernel pieces in locals (as sim/stages/trap/kernel.ts), any
// other model through the plain step after each RK4 step.

import type { MultipoleStage } from './stage.js';
import { Exit, observe, observeHistoryAtEnd, stepsToWatch, storeCursor, type ExitCode, type HardSphereKernel, type IonCursor, type StepContext } from '../../core/cursor.js';
import { phaseTable } from '../../core/phase-table.js';

export function trackMultipole(st: MultipoleStage, c: IonCursor, ctx: StepContext, stepsPerCycle: number): ExitCode {
  const omega = 2 * Math.PI * st.rf.frequency;
  const h = 1 / st.rf.frequency / stepsPerCycle;
  const tab = phaseTable(stepsPerCycle);
  const cosT = tab.cos, sinT = tab.sin;
  const jEnd = 2 * stepsPerCycle;
  const r0 = st.r0, ir0 = 1 / r0, r0sq = r0 * r0;
  const hhF = 0.5 * h, h6F = h / 6;
  const pw = st.poles / 2 - 1; // power of w in the field
  const k = (c.q * (st.poles / 2)) / (c.m * r0);
  const kU = k * st.dc, kV = k * st.rf.amplitude;
  const tEntry = c.t;
  const psi = omega * (tEntry + c.tau) + st.rf.phase;
  const cp = Math.cos(psi), sp = Math.sin(psi);
  const gas = ctx.gas;
  const hk = ctx.hardSphere ?? null;
  let depth = 0, lim = 0, dstep = 0;
  if (hk !== null) { hk.enter(ctx.batch, c.slot); depth = hk.depth; lim = hk.limit2; dstep = hk.rate * h; }

  let x = c.x, y = c.y, z = c.z, vx = c.vx, vy = c.vy, vz = c.vz;
  let n = 0; // steps taken in the stage (all full until the last)
  let j = 0; // half-step index into the phase table
  let span0 = stepsToWatch(c, ctx, h);
  let watchIn = span0;
  for (;;) {
    // One leg: straight in z until the exit plane or max_time, or until a collision changes vz.
    const tNow = tEntry + n * h;
    const tExit = vz > 0 ? (st.zEnd - z) / vz : vz < 0 ? (st.zStart - z) / vz : Infinity;
    const tLeft = ctx.maxTime - tNow;
    const leaves = tExit <= tLeft;
    const span = Math.max(0, leaves ? tExit : tLeft);
    let full = Math.floor(span / h);
    if (full > 0 && full * h >= span) full--;
    const zFrom = z, nFrom = n;
    let replan = false;
    for (;;) {
      const last = full === 0;
      let g0: number, g1: number, g2: number, hs = h;
      const t0 = tEntry + n * h;
      if (last) {
        hs = span - (n - nFrom) * h;
        const th = omega * (t0 + c.tau) + st.rf.phase;
        g0 = kU + kV * Math.cos(th); g1 = kU + kV * Math.cos(th + 0.5 * omega * hs); g2 = kU + kV * Math.cos(th + omega * hs);
      } else {
        g0 = kU + kV * (cosT[j] * cp - sinT[j] * sp);
        g1 = kU + kV * (cosT[j + 1] * cp - sinT[j + 1] * sp);
        g2 = kU + kV * (cosT[j + 2] * cp - sinT[j + 2] * sp);
      }
      if (hs > 0) {
        // Full steps use the step's constants (a division per step costs more than the branch).
        const hh = last ? 0.5 * hs : hhF, h6 = last ? hs / 6 : h6F;
        // w^(n−1) at each of the four RK4 points: written out for the quadrupole, hexapole and
        // octupole (a loop over a run-time power is not unrolled by V8), by multiplication beyond.
        let X = x * ir0, Y = y * ir0, pr: number, pi: number;
        if (pw === 3) { const X2 = X * X, Y2 = Y * Y; pr = X * (X2 - 3 * Y2); pi = Y * (3 * X2 - Y2); }
        else if (pw === 2) { pr = X * X - Y * Y; pi = 2 * X * Y; }
        else if (pw === 1) { pr = X; pi = Y; }
        else { pr = X; pi = Y; for (let e = 1; e < pw; e++) { const t = pr * X - pi * Y; pi = pr * Y + pi * X; pr = t; } }
        const ax1 = -g0 * pr, ay1 = g0 * pi;
        const x2 = x + hh * vx, y2 = y + hh * vy, vx2 = vx + hh * ax1, vy2 = vy + hh * ay1;
        X = x2 * ir0; Y = y2 * ir0;
        if (pw === 3) { const X2 = X * X, Y2 = Y * Y; pr = X * (X2 - 3 * Y2); pi = Y * (3 * X2 - Y2); }
        else if (pw === 2) { pr = X * X - Y * Y; pi = 2 * X * Y; }
        else if (pw === 1) { pr = X; pi = Y; }
        else { pr = X; pi = Y; for (let e = 1; e < pw; e++) { const t = pr * X - pi * Y; pi = pr * Y + pi * X; pr = t; } }
        const ax2 = -g1 * pr, ay2 = g1 * pi;
        const x3 = x + hh * vx2, y3 = y + hh * vy2, vx3 = vx + hh * ax2, vy3 = vy + hh * ay2;
        X = x3 * ir0; Y = y3 * ir0;
        if (pw === 3) { const X2 = X * X, Y2 = Y * Y; pr = X * (X2 - 3 * Y2); pi = Y * (3 * X2 - Y2); }
        else if (pw === 2) { pr = X * X - Y * Y; pi = 2 * X * Y; }
        else if (pw === 1) { pr = X; pi = Y; }
        else { pr = X; pi = Y; for (let e = 1; e < pw; e++) { const t = pr * X - pi * Y; pi = pr * Y + pi * X; pr = t; } }
        const ax3 = -g1 * pr, ay3 = g1 * pi;
        const x4 = x + hs * vx3, y4 = y + hs * vy3, vx4 = vx + hs * ax3, vy4 = vy + hs * ay3;
        X = x4 * ir0; Y = y4 * ir0;
        if (pw === 3) { const X2 = X * X, Y2 = Y * Y; pr = X * (X2 - 3 * Y2); pi = Y * (3 * X2 - Y2); }
        else if (pw === 2) { pr = X * X - Y * Y; pi = 2 * X * Y; }
        else if (pw === 1) { pr = X; pi = Y; }
        else { pr = X; pi = Y; for (let e = 1; e < pw; e++) { const t = pr * X - pi * Y; pi = pr * Y + pi * X; pr = t; } }
        const ax4 = -g2 * pr, ay4 = g2 * pi;
        x += h6 * (vx + 2 * vx2 + 2 * vx3 + vx4);
        y += h6 * (vy + 2 * vy2 + 2 * vy3 + vy4);
        vx += h6 * (ax1 + 2 * ax2 + 2 * ax3 + ax4);
        vy += h6 * (ay1 + 2 * ay2 + 2 * ay3 + ay4);
        n++;
        j += 2;
        if (j === jEnd) j = 0;
      }
      const t1 = t0 + (hs > 0 ? hs : 0);
      // z is linear in t within the leg (worked out only where it is read); the last step lands
      // exactly on the plane.
      if (x * x + y * y >= r0sq || last) {
        z = last && leaves ? (vz > 0 ? st.zEnd : st.zStart) : zFrom + (t1 - tEntry - nFrom * h) * vz;
        storeCursor(c, t1, x, y, z, vx, vy, vz, n);
        const code = x * x + y * y >= r0sq ? Exit.hit : !leaves ? Exit.time : vz > 0 ? Exit.forward : Exit.backward;
        if (code === Exit.time) observeHistoryAtEnd(c, ctx);
        return leave(hk, ctx, c, depth, code);
      }
      full--;
      if (--watchIn <= 0) {
        z = zFrom + (t1 - tEntry - nFrom * h) * vz;
        storeCursor(c, t1, x, y, z, vx, vy, vz, 0);
        observe(c, ctx, span0);
        watchIn = span0 = stepsToWatch(c, ctx, h);
      }
      if (hk !== null) {
        const v2 = vx * vx + vy * vy + vz * vz, d = depth - dstep;
        if (v2 <= lim && d > 0) depth = d;
        else {
          const b = ctx.batch, i = c.slot;
          b.vx[i] = vx; b.vy[i] = vy; b.vz[i] = vz;
          hk.collide(b, i, h, depth);
          depth = hk.depth; lim = hk.limit2; dstep = hk.rate * h;
          vx = b.vx[i]; vy = b.vy[i];
          if (b.vz[i] !== vz) { z = zFrom + (t1 - tEntry - nFrom * h) * vz; vz = b.vz[i]; replan = true; }
        }
      } else if (gas !== null) {
        const b = ctx.batch, i = c.slot;
        b.vx[i] = vx; b.vy[i] = vy; b.vz[i] = vz;
        gas(b, i, h);
        vx = b.vx[i]; vy = b.vy[i];
        if (b.vz[i] !== vz) { z = zFrom + (t1 - tEntry - nFrom * h) * vz; vz = b.vz[i]; replan = true; }
      }
      if (replan) break;
    }
  }
}

/** Hand the hard-sphere optical depth back to the gas kernel as the ion leaves (a plain function: see trap/kernel.ts). */
function leave(hk: HardSphereKernel | null, ctx: StepContext, c: IonCursor, depth: number, code: ExitCode): ExitCode {
  if (hk !== null) hk.leave(ctx.batch, c.slot, depth);
  return code;
}
