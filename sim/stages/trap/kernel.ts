// Ideal 3D RF (Paul) trap: ring at U + V cos θ, end caps grounded (DESIGN.md convention).
// Φ = (U + V cos θ)(r² − 2z'²)/d² with d² = r0² + 2z0² and z' measured from the trap centre, so
//   ẍ = −g x,  ÿ = −g y,  z̈' = +2g z',   g(t) = 2q(U + V(t) cos θ)/(m d²)
// (March & Todd, Quadrupole Ion Trap Mass Spectrometry, 2005, ch. 2). V(t) may ramp linearly
// (mass-selective instability scan). Electrodes: ring r² − 2z'² = r0², end caps 2z'² − r² = 2z0²;
// an ion crossing an end cap within its hole radius leaves the trap. RK4 as in quadrupole.ts.
// A supplementary dipolar AC between the end caps (resonance ejection) adds the uniform-field
// approximation E_z = A cos(ω_aux t + φ)/(2 z0) (the field between the caps at the centre, without
// the geometry factor of real hyperbolic caps; March & Todd 2005, ch. 3); its phase advances by a
// rotation per half step, so no Math.cos runs per step.

import type { TrapStage } from './stage.js';
import { Exit, observe, stepsToWatch, storeCursor, type ExitCode, type IonCursor, type StepContext, type HardSphereKernel } from '../../core/cursor.js';
import { phaseTable } from '../../core/phase-table.js';


export function trackTrap(st: TrapStage, c: IonCursor, ctx: StepContext, stepsPerCycle: number): ExitCode {
  const omega = 2 * Math.PI * st.rf.frequency;
  const h = 1 / st.rf.frequency / stepsPerCycle;
  const tab = phaseTable(stepsPerCycle);
  const cosT = tab.cos, sinT = tab.sin;
  const jEnd = 2 * stepsPerCycle;
  const d2 = st.r0 * st.r0 + 2 * st.z0 * st.z0;
  const k = (2 * c.q) / (c.m * d2);
  const kU = k * st.dc;
  const kV0 = k * st.rf.amplitude;
  const ramp = st.rf.ramp;
  const kRate = ramp ? (k * (ramp.to - st.rf.amplitude)) / ramp.over : 0;
  const tRampEnd = ramp ? ramp.over : Infinity;
  const kVto = ramp ? k * ramp.to : kV0;
  const zc = 0.5 * (st.zStart + st.zEnd);
  const r0sq = st.r0 * st.r0, z0sq2 = 2 * st.z0 * st.z0, ap2 = st.aperture * st.aperture;
  // Outside the end caps (the stage may be longer than 2·z0): field-free up to the cap plane.
  {
    const zr = c.z - zc, r2 = c.x * c.x + c.y * c.y;
    if (2 * zr * zr - r2 >= z0sq2) {
      const inward = zr * c.vz < 0;
      const zb = inward ? (zr < 0 ? -st.z0 : st.z0) : c.vz > 0 ? st.zEnd - zc : st.zStart - zc;
      const dt = c.vz !== 0 ? (zb - zr) / c.vz : Infinity;
      if (!(c.t + dt <= ctx.maxTime)) {
        const rem = ctx.maxTime - c.t;
        storeCursor(c, ctx.maxTime, c.x + c.vx * rem, c.y + c.vy * rem, c.z + c.vz * rem, c.vx, c.vy, c.vz, 1);
        return Exit.time;
      }
      storeCursor(c, c.t + dt, c.x + c.vx * dt, c.y + c.vy * dt, zb + zc, c.vx, c.vy, c.vz, 1);
      if (!inward) return c.vz > 0 ? Exit.forward : Exit.backward;
      if (c.x * c.x + c.y * c.y >= ap2) return Exit.hit;
    }
  }
  const tEntry = c.t;
  const psi = omega * (tEntry + c.tau) + st.rf.phase;
  const cp = Math.cos(psi), sp = Math.sin(psi);
  const gas = ctx.gas;
  // Hard-sphere gas through its kernel pieces (sim/gas/hardsphere.ts): the ion's optical depth,
  // speed bound and majorant rate stay in locals, and the kernel runs only when a candidate
  // collision is due or the speed outgrows its bound — bit-identical to calling the plain step.
  const hk = ctx.hardSphere ?? null;
  // dstep: optical depth used per full step (majorant rate × h).
  let depth = 0, lim = 0, dstep = 0;
  if (hk !== null) { hk.enter(ctx.batch, c.slot); depth = hk.depth; lim = hk.limit2; dstep = hk.rate * h; }

  let x = c.x, y = c.y, z = c.z - zc, vx = c.vx, vy = c.vy, vz = c.vz;
  const span = ctx.maxTime - tEntry;
  const full = Math.max(0, Math.floor(span / h));
  let j = 0;
  let n = 0;
  let hs = h;
  // Supplementary AC: (ca, sa) = cos, sin of its phase at the start of the current step.
  const aux = st.aux;
  const kA = aux ? (c.q * aux.amplitude) / (2 * st.z0 * c.m) : 0;
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
    const ax1 = -g0 * x;
    const x2 = x + hh * vx, vx2 = vx + hh * ax1, ax2 = -g1 * x2;
    const x3 = x + hh * vx2, vx3 = vx + hh * ax2, ax3 = -g1 * x3;
    const x4 = x + hs * vx3, vx4 = vx + hs * ax3, ax4 = -g2 * x4;
    x += h6 * (vx + 2 * vx2 + 2 * vx3 + vx4);
    vx += h6 * (ax1 + 2 * ax2 + 2 * ax3 + ax4);
    const ay1 = -g0 * y;
    const y2 = y + hh * vy, vy2 = vy + hh * ay1, ay2 = -g1 * y2;
    const y3 = y + hh * vy2, vy3 = vy + hh * ay2, ay3 = -g1 * y3;
    const y4 = y + hs * vy3, vy4 = vy + hs * ay3, ay4 = -g2 * y4;
    y += h6 * (vy + 2 * vy2 + 2 * vy3 + vy4);
    vy += h6 * (ay1 + 2 * ay2 + 2 * ay3 + ay4);
    const az1 = 2 * g0 * z + f0;
    const z2 = z + hh * vz, vz2 = vz + hh * az1, az2 = 2 * g1 * z2 + f1;
    const z3 = z + hh * vz2, vz3 = vz + hh * az2, az3 = 2 * g1 * z3 + f1;
    const z4 = z + hs * vz3, vz4 = vz + hs * az3, az4 = 2 * g2 * z4 + f2;
    z += h6 * (vz + 2 * vz2 + 2 * vz3 + vz4);
    vz += h6 * (az1 + 2 * az2 + 2 * az3 + az4);
    const t1 = t0 + hs;
    n++;
    j += 2;
    if (j === jEnd) j = 0;
    const r2 = x * x + y * y, zz2 = 2 * z * z;
    if (r2 - zz2 >= r0sq) { storeCursor(c, t1, x, y, z + zc, vx, vy, vz, n); return leave(hk, ctx, c, depth, Exit.hit); }
    if (zz2 - r2 >= z0sq2) {
      if (r2 >= ap2) { storeCursor(c, t1, x, y, z + zc, vx, vy, vz, n); return leave(hk, ctx, c, depth, Exit.hit); }
      // Through the end-cap hole: field-free from here to the stage boundary.
      const zb = vz > 0 ? st.zEnd - zc : st.zStart - zc;
      const dt = vz !== 0 ? (zb - z) / vz : Infinity;
      if (!(t1 + dt <= ctx.maxTime)) {
        const rem = ctx.maxTime - t1;
        storeCursor(c, ctx.maxTime, x + vx * rem, y + vy * rem, z + zc + vz * rem, vx, vy, vz, n);
        return leave(hk, ctx, c, depth, Exit.time);
      }
      storeCursor(c, t1 + dt, x + vx * dt, y + vy * dt, zb + zc, vx, vy, vz, n);
      return vz > 0 ? Exit.forward : Exit.backward;
    }
    if (last) { storeCursor(c, t1, x, y, z + zc, vx, vy, vz, n); return leave(hk, ctx, c, depth, Exit.time); }
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
  return leave(hk, ctx, c, depth, Exit.time);

  function vAt(t: number): number {
    return t >= tRampEnd ? kVto : kV0 + kRate * t;
  }
}


/**
 * Hand the hard-sphere optical depth back to the gas kernel as the ion leaves. A plain function,
 * not a closure: a local captured by a closure would live on the heap and slow every step.
 */
function leave(hk: HardSphereKernel | null, ctx: StepContext, c: IonCursor, depth: number, code: ExitCode): ExitCode {
  if (hk !== null) hk.leave(ctx.batch, c.slot, depth);
  return code;
}
