// Linear quadrupole trap (field.ts), z from the stage centre, g(t) = 2q(U + V(t) cos θ)/(m r0²),
// w = qκU_end/(m z0²):
//   ẍ = −g x + w x + f(t),  ÿ = +g y + w y,  z̈ = −2w z,   f(t) = qA cos(ω t + φ)/(2 m r0)
// so the axial motion is harmonic at ω_z² = 2w and the well shifts both radial Mathieu a by
// −4w/Ω² (x'' + (a_x − 4w/Ω² + 2q_x cos 2τ) x = 0 with τ = Ωt/2; DESIGN.md filter convention for
// a and q). V(t) may ramp linearly (mass scan), as in the 3D trap. RK4 as in trap/kernel.ts, the RF
// phase from the phase table, the supplementary AC by a rotation per half step.
// An ion that reaches the rods' inscribed circle leaves the trap radially: through the slot of an
// x rod (|x| ≥ |y|, the rod pair the AC is applied across) it is detected, on a y rod it is lost;
// at |z| = z0 it strikes an end electrode (the ideal well has no opening).

import type { LinearTrapStage } from './stage.js';
import { Exit, observe, observeHistoryAtEnd, stepsToWatch, storeCursor, type ExitCode, type IonCursor, type StepContext, type HardSphereKernel } from '../../core/cursor.js';
import { phaseTable } from '../../core/phase-table.js';

export function trackLinearTrap(st: LinearTrapStage, c: IonCursor, ctx: StepContext, stepsPerCycle: number): ExitCode {
  const omega = 2 * Math.PI * st.rf.frequency;
  const h = 1 / st.rf.frequency / stepsPerCycle;
  const tab = phaseTable(stepsPerCycle);
  const cosT = tab.cos, sinT = tab.sin;
  const jEnd = 2 * stepsPerCycle;
  const k = (2 * c.q) / (c.m * st.r0 * st.r0);
  const kU = k * st.dc;
  const kV0 = k * st.rf.amplitude;
  const ramp = st.rf.ramp;
  const kRate = ramp ? (k * (ramp.to - st.rf.amplitude)) / ramp.over : 0;
  const tRampEnd = ramp ? ramp.over : Infinity;
  const kVto = ramp ? k * ramp.to : kV0;
  const w = (c.q * st.kappa * st.endDc) / (c.m * st.z0 * st.z0), w2 = -2 * w;
  const zc = 0.5 * (st.zStart + st.zEnd);
  const r0sq = st.r0 * st.r0, z0 = st.z0;
  const tEntry = c.t;
  const psi = omega * (tEntry + c.tau) + st.rf.phase;
  const cp = Math.cos(psi), sp = Math.sin(psi);
  const gas = ctx.gas;
  const hk = ctx.hardSphere ?? null;
  let depth = 0, lim = 0, dstep = 0;
  if (hk !== null) { hk.enter(ctx.batch, c.slot); depth = hk.depth; lim = hk.limit2; dstep = hk.rate * h; }

  let x = c.x, y = c.y, z = c.z - zc, vx = c.vx, vy = c.vy, vz = c.vz;
  if (z >= z0 || z <= -z0) { storeCursor(c, c.t, x, y, z + zc, vx, vy, vz, 0); return Exit.hit; }
  const span = ctx.maxTime - tEntry;
  const full = Math.max(0, Math.floor(span / h));
  let j = 0;
  let n = 0;
  let hs = h;
  const aux = st.aux;
  const kA = aux ? (c.q * aux.amplitude) / (2 * st.r0 * c.m) : 0;
  const wA = aux ? 2 * Math.PI * aux.frequency : 0;
  const cd = Math.cos(0.5 * wA * h), sd = Math.sin(0.5 * wA * h);
  let ca = aux ? Math.cos(wA * tEntry + aux.phase) : 0, sa = aux ? Math.sin(wA * tEntry + aux.phase) : 0;
  let f0 = 0, f1 = 0, f2 = 0;
  let span0 = stepsToWatch(c, ctx, h);
  let watchIn = span0;
  for (;;) {
    const last = n === full;
    let g0: number, g1: number, g2: number;
    const t0 = tEntry + n * h;
    if (last) {
      hs = span - full * h;
      if (!(hs > 0)) break;
      const th = omega * (t0 + c.tau) + st.rf.phase;
      g0 = kU + vAt(t0) * Math.cos(th);
      g1 = kU + vAt(t0 + 0.5 * hs) * Math.cos(th + 0.5 * omega * hs);
      g2 = kU + vAt(t0 + hs) * Math.cos(th + omega * hs);
    } else if (ramp === undefined) {
      g0 = kU + kV0 * (cosT[j] * cp - sinT[j] * sp);
      g1 = kU + kV0 * (cosT[j + 1] * cp - sinT[j + 1] * sp);
      g2 = kU + kV0 * (cosT[j + 2] * cp - sinT[j + 2] * sp);
    } else {
      g0 = kU + vAt(t0) * (cosT[j] * cp - sinT[j] * sp);
      g1 = kU + vAt(t0 + 0.5 * h) * (cosT[j + 1] * cp - sinT[j + 1] * sp);
      g2 = kU + vAt(t0 + h) * (cosT[j + 2] * cp - sinT[j + 2] * sp);
    }
    if (aux) {
      if (last) {
        const ph = wA * t0 + aux.phase;
        f0 = kA * Math.cos(ph); f1 = kA * Math.cos(ph + 0.5 * wA * hs); f2 = kA * Math.cos(ph + wA * hs);
      } else {
        const c1 = ca * cd - sa * sd, s1 = sa * cd + ca * sd;
        const c2 = c1 * cd - s1 * sd, s2 = s1 * cd + c1 * sd;
        f0 = kA * ca; f1 = kA * c1; f2 = kA * c2;
        ca = c2; sa = s2;
      }
    }
    const hh = 0.5 * hs, h6 = hs / 6;
    // x: ẍ = (w − g) x + f
    const px0 = w - g0, px1 = w - g1, px2 = w - g2;
    const ax1 = px0 * x + f0;
    const x2 = x + hh * vx, vx2 = vx + hh * ax1, ax2 = px1 * x2 + f1;
    const x3 = x + hh * vx2, vx3 = vx + hh * ax2, ax3 = px1 * x3 + f1;
    const x4 = x + hs * vx3, vx4 = vx + hs * ax3, ax4 = px2 * x4 + f2;
    x += h6 * (vx + 2 * vx2 + 2 * vx3 + vx4);
    vx += h6 * (ax1 + 2 * ax2 + 2 * ax3 + ax4);
    // y: ÿ = (w + g) y
    const py0 = w + g0, py1 = w + g1, py2 = w + g2;
    const ay1 = py0 * y;
    const y2 = y + hh * vy, vy2 = vy + hh * ay1, ay2 = py1 * y2;
    const y3 = y + hh * vy2, vy3 = vy + hh * ay2, ay3 = py1 * y3;
    const y4 = y + hs * vy3, vy4 = vy + hs * ay3, ay4 = py2 * y4;
    y += h6 * (vy + 2 * vy2 + 2 * vy3 + vy4);
    vy += h6 * (ay1 + 2 * ay2 + 2 * ay3 + ay4);
    // z: z̈ = −2w z (steady)
    const az1 = w2 * z;
    const z2 = z + hh * vz, vz2 = vz + hh * az1, az2 = w2 * z2;
    const z3 = z + hh * vz2, vz3 = vz + hh * az2, az3 = w2 * z3;
    const z4 = z + hs * vz3, vz4 = vz + hs * az3, az4 = w2 * z4;
    z += h6 * (vz + 2 * vz2 + 2 * vz3 + vz4);
    vz += h6 * (az1 + 2 * az2 + 2 * az3 + az4);
    const t1 = t0 + hs;
    n++;
    j += 2;
    if (j === jEnd) j = 0;
    if (x * x + y * y >= r0sq) {
      storeCursor(c, t1, x, y, z + zc, vx, vy, vz, n);
      return leave(hk, ctx, c, depth, x * x >= y * y ? Exit.detected : Exit.hit);
    }
    if (z >= z0 || z <= -z0) { storeCursor(c, t1, x, y, z + zc, vx, vy, vz, n); return leave(hk, ctx, c, depth, Exit.hit); }
    if (last) { storeCursor(c, t1, x, y, z + zc, vx, vy, vz, n); observeHistoryAtEnd(c, ctx); return leave(hk, ctx, c, depth, Exit.time); }
    if (--watchIn <= 0) {
      storeCursor(c, t1, x, y, z + zc, vx, vy, vz, 0);
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
        vx = b.vx[i]; vy = b.vy[i]; vz = b.vz[i];
      }
    } else if (gas !== null) {
      const b = ctx.batch, i = c.slot;
      b.vx[i] = vx; b.vy[i] = vy; b.vz[i] = vz;
      gas(b, i, h);
      vx = b.vx[i]; vy = b.vy[i]; vz = b.vz[i];
    }
  }
  storeCursor(c, tEntry + n * h, x, y, z + zc, vx, vy, vz, n);
  observeHistoryAtEnd(c, ctx);
  return leave(hk, ctx, c, depth, Exit.time);

  function vAt(t: number): number {
    return t >= tRampEnd ? kVto : kV0 + kRate * t;
  }
}

/** Hand the hard-sphere optical depth back to the gas kernel as the ion leaves (a plain function: see trap/kernel.ts). */
function leave(hk: HardSphereKernel | null, ctx: StepContext, c: IonCursor, depth: number, code: ExitCode): ExitCode {
  if (hk !== null) hk.leave(ctx.batch, c.slot, depth);
  return code;
}
