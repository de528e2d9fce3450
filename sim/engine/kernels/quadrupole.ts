// Ideal quadrupole mass filter, rods at ±(U + V cos θ), θ = Ω(t + τ) + φ (DESIGN.md convention).
// Potential Φ = (U + V cos θ)(x² − y²)/r0², so
//   ẍ = −g(t) x,  ÿ = +g(t) y,  z̈ = 0,   g(t) = 2q(U + V cos θ)/(m r0²)
// (Dawson 1976, eq. 2.6 in the form before the Mathieu substitution). Classic RK4
// (Hairer, Nørsett & Wanner, Solving ODEs I, Table II.1.2) on fixed steps h = T/n; g is needed
// at t, t + h/2, t + h, taken from the phase table. vz is constant, so the exit time is known
// and the last step is shortened to land on the stage end exactly.

import type { QuadrupoleStage } from '../../scene/types.js';
import { Exit, observe, storeCursor, type ExitCode, type IonCursor, type StepContext } from '../context.js';
import { phaseTable } from '../phase-table.js';

export function trackQuadrupole(st: QuadrupoleStage, c: IonCursor, ctx: StepContext, stepsPerCycle: number): ExitCode {
  const omega = 2 * Math.PI * st.rf.frequency;
  const h = 1 / st.rf.frequency / stepsPerCycle;
  const tab = phaseTable(stepsPerCycle);
  const cosT = tab.cos, sinT = tab.sin;
  const jEnd = 2 * stepsPerCycle;
  const k = (2 * c.q) / (c.m * st.r0 * st.r0);
  const kU = k * st.dc, kV = k * st.rf.amplitude;
  const r0sq = st.r0 * st.r0;
  const tEntry = c.t;
  const psi = omega * (tEntry + c.tau) + st.rf.phase;
  const cp = Math.cos(psi), sp = Math.sin(psi);
  const hh = 0.5 * h, h6 = h / 6;
  const gas = ctx.gas;
  const watch = ctx.rec !== null || ctx.hist !== null;

  let x = c.x, y = c.y, vx = c.vx, vy = c.vy;
  let z = c.z, vz = c.vz;
  let n = 0; // full steps taken in this stage
  let j = 0; // half-step index into the phase table

  for (;;) {
    const tNow = tEntry + n * h;
    const tExit = vz > 0 ? (st.zEnd - z) / vz : vz < 0 ? (st.zStart - z) / vz : Infinity;
    const tLeft = ctx.maxTime - tNow;
    const leaves = tExit <= tLeft;
    const span = leaves ? tExit : tLeft;
    const full = Math.floor(span / h);
    let interrupted = false;
    for (let s = 0; s < full; s++) {
      const g0 = kU + kV * (cosT[j] * cp - sinT[j] * sp);
      const g1 = kU + kV * (cosT[j + 1] * cp - sinT[j + 1] * sp);
      const g2 = kU + kV * (cosT[j + 2] * cp - sinT[j + 2] * sp);
      // x'' = -g x
      const ax1 = -g0 * x;
      const x2 = x + hh * vx, vx2 = vx + hh * ax1, ax2 = -g1 * x2;
      const x3 = x + hh * vx2, vx3 = vx + hh * ax2, ax3 = -g1 * x3;
      const x4 = x + h * vx3, vx4 = vx + h * ax3, ax4 = -g2 * x4;
      x += h6 * (vx + 2 * vx2 + 2 * vx3 + vx4);
      vx += h6 * (ax1 + 2 * ax2 + 2 * ax3 + ax4);
      // y'' = +g y
      const ay1 = g0 * y;
      const y2 = y + hh * vy, vy2 = vy + hh * ay1, ay2 = g1 * y2;
      const y3 = y + hh * vy2, vy3 = vy + hh * ay2, ay3 = g1 * y3;
      const y4 = y + h * vy3, vy4 = vy + h * ay3, ay4 = g2 * y4;
      y += h6 * (vy + 2 * vy2 + 2 * vy3 + vy4);
      vy += h6 * (ay1 + 2 * ay2 + 2 * ay3 + ay4);
      z += h * vz;
      n++;
      j += 2;
      if (j === jEnd) j = 0;
      if (x * x + y * y >= r0sq) {
        storeCursor(c, tEntry + n * h, x, y, z, vx, vy, vz, n);
        return Exit.hit;
      }
      if (watch) {
        storeCursor(c, tEntry + n * h, x, y, z, vx, vy, vz, 0);
        observe(c, ctx);
      }
      if (gas !== null) {
        const b = ctx.batch, i = c.slot;
        b.vx[i] = vx; b.vy[i] = vy; b.vz[i] = vz;
        gas(b, i, h);
        vx = b.vx[i]; vy = b.vy[i];
        if (b.vz[i] !== vz) { vz = b.vz[i]; interrupted = true; break; }
      }
    }
    if (interrupted) continue;
    // Last, shortened step to the stage end or to max_time; Math.cos here runs once per ion.
    const t0 = tEntry + n * h;
    const hl = span - full * h;
    if (hl > 0) {
      const th = omega * (t0 + c.tau) + st.rf.phase;
      const g0 = kU + kV * Math.cos(th);
      const g1 = kU + kV * Math.cos(th + 0.5 * omega * hl);
      const g2 = kU + kV * Math.cos(th + omega * hl);
      const hl2 = 0.5 * hl, hl6 = hl / 6;
      const ax1 = -g0 * x;
      const x2 = x + hl2 * vx, vx2 = vx + hl2 * ax1, ax2 = -g1 * x2;
      const x3 = x + hl2 * vx2, vx3 = vx + hl2 * ax2, ax3 = -g1 * x3;
      const x4 = x + hl * vx3, vx4 = vx + hl * ax3, ax4 = -g2 * x4;
      x += hl6 * (vx + 2 * vx2 + 2 * vx3 + vx4);
      vx += hl6 * (ax1 + 2 * ax2 + 2 * ax3 + ax4);
      const ay1 = g0 * y;
      const y2 = y + hl2 * vy, vy2 = vy + hl2 * ay1, ay2 = g1 * y2;
      const y3 = y + hl2 * vy2, vy3 = vy + hl2 * ay2, ay3 = g1 * y3;
      const y4 = y + hl * vy3, vy4 = vy + hl * ay3, ay4 = g2 * y4;
      y += hl6 * (vy + 2 * vy2 + 2 * vy3 + vy4);
      vy += hl6 * (ay1 + 2 * ay2 + 2 * ay3 + ay4);
      c.steps++;
    }
    // Land exactly on the boundary (vz is constant, so the crossing time is exact).
    if (leaves) z = vz > 0 ? st.zEnd : st.zStart; else z += hl * vz;
    storeCursor(c, t0 + hl, x, y, z, vx, vy, vz, n);
    if (x * x + y * y >= r0sq) return Exit.hit;
    if (!leaves) return Exit.time;
    return vz > 0 ? Exit.forward : Exit.backward;
  }
}

