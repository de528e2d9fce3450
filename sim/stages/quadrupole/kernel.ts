// Ideal quadrupole mass filter, rods at ±(U + V cos θ), θ = Ω(t + τ) + φ (DESIGN.md convention).
// Potential Φ = (U + V cos θ)(x² − y²)/r0², so
//   ẍ = −g(t) x,  ÿ = +g(t) y,  z̈ = 0,   g(t) = 2q(U + V cos θ)/(m r0²)
// (Dawson 1976, eq. 2.6 in the form before the Mathieu substitution). Classic RK4
// (Hairer, Nørsett & Wanner, Solving ODEs I, Table II.1.2) on fixed steps h = T/n.
//
// Speed: the loop runs in scaled variables X = x/r0, P = h·vx/r0 and G = g·h², so the step is 1
// and the electrode test is X² + Y² ≥ 1. The equations are linear, so one RK4 step from phase k is
// a fixed 2×2 map of (X, P) — its amplification matrix, the RK4 stages applied to the unit vectors
// (Hairer, Nørsett & Wanner I, §II.1; the same arithmetic as the stage formulas, regrouped). The
// matrices of the steps of one period are built per ion from G at the half steps (the phase table
// gives cos, sin; the ion's phase ψ enters once), so a step costs 8 multiplications. vz is
// constant, so the exit time is known and the last step is shortened to land on the stage end.

import type { QuadrupoleStage } from './stage.js';
import { Exit, observe, stepsToWatch, storeCursor, type ExitCode, type IonCursor, type StepContext } from '../../core/cursor.js';
import { phaseTable } from '../../core/phase-table.js';

let gTab = new Float64Array(0);
let mTab = new Float64Array(0);

/**
 * RK4 amplification matrix of u'' = s·g(t)·u over one unit step with g = g0, g1, g2 at the start,
 * middle and end (s = −1 for x, +1 for y), written into m[o..o+3] as [a11, a12, a21, a22].
 */
function rk4Matrix(m: Float64Array, o: number, sg: number, g0: number, g1: number, g2: number): void {
  for (let col = 0; col < 2; col++) {
    const X = col === 0 ? 1 : 0, P = col === 0 ? 0 : 1;
    const a1 = sg * g0 * X;
    const X2 = X + 0.5 * P, P2 = P + 0.5 * a1, a2 = sg * g1 * X2;
    const X3 = X + 0.5 * P2, P3 = P + 0.5 * a2, a3 = sg * g1 * X3;
    const X4 = X + P3, P4 = P + a3, a4 = sg * g2 * X4;
    m[o + col] = X + (P + 2 * P2 + 2 * P3 + P4) * (1 / 6);
    m[o + 2 + col] = P + (a1 + 2 * a2 + 2 * a3 + a4) * (1 / 6);
  }
}

export function trackQuadrupole(st: QuadrupoleStage, c: IonCursor, ctx: StepContext, stepsPerCycle: number): ExitCode {
  const omega = 2 * Math.PI * st.rf.frequency;
  const h = 1 / st.rf.frequency / stepsPerCycle;
  const r0 = st.r0;
  const tab = phaseTable(stepsPerCycle);
  const jEnd = 2 * stepsPerCycle;
  const k = (2 * c.q * h * h) / (c.m * r0 * r0);
  const tEntry = c.t;
  const psi = omega * (tEntry + c.tau) + st.rf.phase;
  const cp = Math.cos(psi), sp = Math.sin(psi);
  if (gTab.length < jEnd + 1) gTab = new Float64Array(jEnd + 1);
  const G = gTab;
  for (let j = 0; j <= jEnd; j++) G[j] = k * (st.dc + st.rf.amplitude * (tab.cos[j] * cp - tab.sin[j] * sp));
  if (mTab.length < 8 * stepsPerCycle) mTab = new Float64Array(8 * stepsPerCycle);
  const M = mTab;
  for (let p = 0; p < stepsPerCycle; p++) {
    rk4Matrix(M, 8 * p, -1, G[2 * p], G[2 * p + 1], G[2 * p + 2]);
    rk4Matrix(M, 8 * p + 4, 1, G[2 * p], G[2 * p + 1], G[2 * p + 2]);
  }
  const gas = ctx.gas;
  const toP = h / r0, fromP = r0 / h;

  let X = c.x / r0, Y = c.y / r0, PX = c.vx * toP, PY = c.vy * toP;
  let z = c.z, vz = c.vz;
  let n = 0; // full steps taken in this stage
  let j = 0; // step index within the period (matrix table)
  let span0 = stepsToWatch(c, ctx, h);
  let watchIn = span0;

  for (;;) {
    const tNow = tEntry + n * h;
    const tExit = vz > 0 ? (st.zEnd - z) / vz : vz < 0 ? (st.zStart - z) / vz : Infinity;
    const tLeft = ctx.maxTime - tNow;
    const leaves = tExit <= tLeft;
    const span = leaves ? tExit : tLeft;
    const full = n + Math.floor(span / h);
    const zFrom = z, nFrom = n;
    let interrupted = false;
    while (n < full) {
      // Steps until something must look at the ion: a record, a history sample, a gas event.
      const lim = gas !== null ? 1 : Math.min(full - n, watchIn);
      for (let s = 0; s < lim; s++) {
        const o = 8 * j;
        const nX = M[o] * X + M[o + 1] * PX, nP = M[o + 2] * X + M[o + 3] * PX;
        const nY = M[o + 4] * Y + M[o + 5] * PY, nQ = M[o + 6] * Y + M[o + 7] * PY;
        X = nX; PX = nP; Y = nY; PY = nQ;
        if (++j === stepsPerCycle) j = 0;
        if (X * X + Y * Y >= 1) {
          n += s + 1;
          storeCursor(c, tEntry + n * h, X * r0, Y * r0, zFrom + (n - nFrom) * h * vz, PX * fromP, PY * fromP, vz, n);
          return Exit.hit;
        }
      }
      n += lim;
      z = zFrom + (n - nFrom) * h * vz;
      watchIn -= lim;
      if (watchIn <= 0) {
        storeCursor(c, tEntry + n * h, X * r0, Y * r0, z, PX * fromP, PY * fromP, vz, 0);
        observe(c, ctx, span0);
        watchIn = span0 = stepsToWatch(c, ctx, h);
      }
      if (gas !== null) {
        const b = ctx.batch, i = c.slot;
        b.vx[i] = PX * fromP; b.vy[i] = PY * fromP; b.vz[i] = vz;
        gas(b, i, h);
        PX = b.vx[i] * toP; PY = b.vy[i] * toP;
        if (b.vz[i] !== vz) { vz = b.vz[i]; interrupted = true; break; }
      }
    }
    if (interrupted) continue;
    // Last, shortened step to the stage end or to max_time; Math.cos here runs once per ion.
    const t0 = tEntry + n * h;
    const hl = span - (n - nFrom) * h;
    let x = X * r0, y = Y * r0, vx = PX * fromP, vy = PY * fromP;
    if (hl > 0) {
      const kk = k / (h * h);
      const th = omega * (t0 + c.tau) + st.rf.phase;
      const g0 = kk * (st.dc + st.rf.amplitude * Math.cos(th));
      const g1 = kk * (st.dc + st.rf.amplitude * Math.cos(th + 0.5 * omega * hl));
      const g2 = kk * (st.dc + st.rf.amplitude * Math.cos(th + omega * hl));
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
    z = leaves ? (vz > 0 ? st.zEnd : st.zStart) : zFrom + span * vz;
    storeCursor(c, t0 + hl, x, y, z, vx, vy, vz, n);
    if (x * x + y * y >= r0 * r0) return Exit.hit;
    if (!leaves) return Exit.time;
    return vz > 0 ? Exit.forward : Exit.backward;
  }
}
