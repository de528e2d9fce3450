// Ions through a solved electrode field. The potential is the superposition of the unit solutions,
//   Φ(x, t) = Φ_dc(x) + V(t) cos θ · Φ_rf(x) + A cos(ω_a t + φ_a) · Φ_aux(x),  θ = Ω(t + τ) + φ,
// (solution.ts: the per-drive sums of the electrodes' unit solutions), and the ion obeys
//   ẍ = −(q/m) ∇Φ(x, t)
// with ∇Φ the analytic gradient of the cubic interpolant (sim/fields/interpolate.ts), so that in a
// static field ½mv² + qΦ is conserved to the integrator's accuracy. Classic RK4 (Hairer, Nørsett &
// Wanner, Solving ODEs I, Table II.1.2) on fixed steps: h = T/n with the RF (cos θ at the half
// steps from the phase table), else the run's step without RF. The supplementary AC advances by a
// rotation per half step, as in the trap kernel. No allocation and no Math.cos per step.
//
// An ion is `hit` where it enters an electrode (the inside test of its shapes, run only near one:
// solution.ts near mask), placed at the entry point of its last step (the segment's crossing of
// the surface), or where it leaves the grid sideways (the grounded box edge). It leaves forward or
// backward through the planes z = 0 and z = length of the stage, placed on the plane on the step's
// cubic Hermite path.

import { Exit, observe, stepsToWatch, storeCursor, type ExitCode, type IonCursor, type StepContext } from '../../core/cursor.js';
import { phaseTable } from '../../core/phase-table.js';
import type { ElectrodesStage } from './stage.js';
import { solvedFieldOf, type SolvedField } from './solution.js';

/** Scratch: the acceleration of one RK4 stage (no allocation per step). */
const acc = new Float64Array(3);

/**
 * a = −(q/m)(∇Φ_dc + cr ∇Φ_rf + ca ∇Φ_aux) at (x, y, z) into acc; false outside the grid
 * sideways (the grounded box edge).
 */
function accel(F: SolvedField, qm: number, x: number, y: number, z: number, cr: number, ca: number): boolean {
  // An RK4 stage point just past an end plane takes the field of the plane (the ion leaves there).
  if (z > F.zMax) z = F.zMax; else if (z < 0) z = 0;
  if (!F.gradient(x, y, z, cr, ca, acc)) return false;
  acc[0] *= -qm; acc[1] *= -qm; acc[2] *= -qm;
  return true;
}

export function trackElectrodes(st: ElectrodesStage, c: IonCursor, ctx: StepContext, stepsPerCycle: number, stepNoRf: number): ExitCode {
  const F = solvedFieldOf(st);
  const rf = st.rf;
  const withRf = rf !== undefined && F.oRf > 0;
  const h = withRf ? 1 / rf.frequency / stepsPerCycle : stepNoRf;
  const L = st.length;
  const qm = c.q / c.m;
  const tEntry = c.t;
  let x = c.x, y = c.y, z = c.z - st.zStart, vx = c.vx, vy = c.vy, vz = c.vz;
  // Started (or entered) inside an electrode: lost at once.
  if (F.electrodeAt(x, y, z) >= 0) { storeCursor(c, c.t, x, y, z + st.zStart, vx, vy, vz, 0); return Exit.hit; }
  // RF drive at the half steps: V(t)·cos θ, cos θ_j = cos(jπ/n)cos ψ − sin(jπ/n)sin ψ.
  const tab = phaseTable(stepsPerCycle);
  const cosT = tab.cos, sinT = tab.sin, jEnd = 2 * stepsPerCycle;
  const omega = withRf ? 2 * Math.PI * rf.frequency : 0;
  const psi = withRf ? omega * (tEntry + c.tau) + rf.phase : 0;
  const cp = Math.cos(psi), sp = Math.sin(psi);
  const V0 = withRf ? rf.amplitude : 0;
  const ramp = withRf ? rf.ramp : undefined;
  const rate = ramp ? (ramp.to - V0) / ramp.over : 0;
  const tRampEnd = ramp ? ramp.over : Infinity;
  const Vto = ramp ? ramp.to : V0;
  // Supplementary AC: (ca, sa) its cos, sin at the start of the step, rotated by ω_a h/2 per half step.
  const aux = F.oAux > 0 ? st.aux : undefined;
  const A = aux ? aux.amplitude : 0, wA = aux ? 2 * Math.PI * aux.frequency : 0;
  const cd = Math.cos(0.5 * wA * h), sd = Math.sin(0.5 * wA * h);
  let ca = aux ? Math.cos(wA * tEntry + aux.phase) : 0, sa = aux ? Math.sin(wA * tEntry + aux.phase) : 0;
  const gas = ctx.gas;
  const span = ctx.maxTime - tEntry;
  const full = Math.max(0, Math.floor(span / h));
  let j = 0, n = 0, hs = h;
  let span0 = stepsToWatch(c, ctx, h);
  let watchIn = span0;
  for (;;) {
    const last = n === full;
    const t0 = tEntry + n * h;
    let r0 = 0, r1 = 0, r2 = 0, a0 = 0, a1 = 0, a2 = 0;
    if (last) {
      hs = span - full * h;
      if (!(hs > 0)) break;
      if (withRf) {
        const th = omega * (t0 + c.tau) + rf.phase;
        r0 = vAt(t0) * Math.cos(th); r1 = vAt(t0 + 0.5 * hs) * Math.cos(th + 0.5 * omega * hs); r2 = vAt(t0 + hs) * Math.cos(th + omega * hs);
      }
      if (aux) {
        const ph = wA * t0 + aux.phase;
        a0 = A * Math.cos(ph); a1 = A * Math.cos(ph + 0.5 * wA * hs); a2 = A * Math.cos(ph + wA * hs);
      }
    } else {
      if (withRf) {
        const c0 = cosT[j] * cp - sinT[j] * sp, c1 = cosT[j + 1] * cp - sinT[j + 1] * sp, c2 = cosT[j + 2] * cp - sinT[j + 2] * sp;
        if (ramp === undefined) { r0 = V0 * c0; r1 = V0 * c1; r2 = V0 * c2; }
        else { r0 = vAt(t0) * c0; r1 = vAt(t0 + 0.5 * h) * c1; r2 = vAt(t0 + h) * c2; }
      }
      if (aux) {
        const c1 = ca * cd - sa * sd, s1 = sa * cd + ca * sd;
        const c2 = c1 * cd - s1 * sd, s2 = s1 * cd + c1 * sd;
        a0 = A * ca; a1 = A * c1; a2 = A * c2;
        ca = c2; sa = s2;
      }
    }
    const hh = 0.5 * hs, h6 = hs / 6;
    if (!accel(F, qm, x, y, z, r0, a0)) { storeCursor(c, t0, x, y, z + st.zStart, vx, vy, vz, n); return Exit.hit; }
    const k1x = acc[0], k1y = acc[1], k1z = acc[2];
    const x2 = x + hh * vx, y2 = y + hh * vy, z2 = z + hh * vz;
    const u2 = vx + hh * k1x, w2 = vy + hh * k1y, s2 = vz + hh * k1z;
    if (!accel(F, qm, x2, y2, z2, r1, a1)) { storeCursor(c, t0, x, y, z + st.zStart, vx, vy, vz, n); return Exit.hit; }
    const k2x = acc[0], k2y = acc[1], k2z = acc[2];
    const x3 = x + hh * u2, y3 = y + hh * w2, z3 = z + hh * s2;
    const u3 = vx + hh * k2x, w3 = vy + hh * k2y, s3 = vz + hh * k2z;
    if (!accel(F, qm, x3, y3, z3, r1, a1)) { storeCursor(c, t0, x, y, z + st.zStart, vx, vy, vz, n); return Exit.hit; }
    const k3x = acc[0], k3y = acc[1], k3z = acc[2];
    const x4 = x + hs * u3, y4 = y + hs * w3, z4 = z + hs * s3;
    const u4 = vx + hs * k3x, w4 = vy + hs * k3y, s4 = vz + hs * k3z;
    if (!accel(F, qm, x4, y4, z4, r2, a2)) { storeCursor(c, t0, x, y, z + st.zStart, vx, vy, vz, n); return Exit.hit; }
    const k4x = acc[0], k4y = acc[1], k4z = acc[2];
    const px = x, py = y, pz = z, pvx = vx, pvy = vy, pvz = vz;
    x += h6 * (vx + 2 * u2 + 2 * u3 + u4);
    y += h6 * (vy + 2 * w2 + 2 * w3 + w4);
    z += h6 * (vz + 2 * s2 + 2 * s3 + s4);
    vx += h6 * (k1x + 2 * k2x + 2 * k3x + k4x);
    vy += h6 * (k1y + 2 * k2y + 2 * k3y + k4y);
    vz += h6 * (k1z + 2 * k2z + 2 * k3z + k4z);
    const t1 = t0 + hs;
    n++;
    j += 2;
    if (j === jEnd) j = 0;
    const e = F.electrodeAt(x, y, z);
    if (e >= 0) {
      const f = F.entryFraction(e, px, py, pz, x, y, z);
      storeCursor(c, t0 + f * hs, px + f * (x - px), py + f * (y - py), pz + f * (z - pz) + st.zStart,
        pvx + f * (vx - pvx), pvy + f * (vy - pvy), pvz + f * (vz - pvz), n);
      return Exit.hit;
    }
    if (z >= L || z < 0) {
      // Onto the exit plane: the step's path as the cubic Hermite curve through its end points and
      // velocities (third-order in the step, where a chord is second-order: the kinetic energy on
      // the plane was off by ~1e-4 of the lens's ΔV at 2 ns steps), its crossing of the plane by
      // Newton's method from the chord's, and the velocity as the curve's derivative there.
      const zb = z >= L ? L : 0;
      let f = (zb - pz) / (z - pz);
      for (let it = 0; it < 4; it++) {
        const f2 = f * f, f3 = f2 * f;
        const zf = (2 * f3 - 3 * f2 + 1) * pz + (f3 - 2 * f2 + f) * hs * pvz + (-2 * f3 + 3 * f2) * z + (f3 - f2) * hs * vz;
        const dz = (6 * f2 - 6 * f) * pz + (3 * f2 - 4 * f + 1) * hs * pvz + (-6 * f2 + 6 * f) * z + (3 * f2 - 2 * f) * hs * vz;
        if (!(dz !== 0)) break;
        const g = f - (zf - zb) / dz;
        f = g < 0 ? 0 : g > 1 ? 1 : g;
      }
      const f2 = f * f, f3 = f2 * f;
      const a0 = 2 * f3 - 3 * f2 + 1, b0 = (f3 - 2 * f2 + f) * hs, a1 = -2 * f3 + 3 * f2, b1 = (f3 - f2) * hs;
      const c0 = (6 * f2 - 6 * f) / hs, e0 = 3 * f2 - 4 * f + 1, c1 = (-6 * f2 + 6 * f) / hs, e1 = 3 * f2 - 2 * f;
      storeCursor(c, t0 + f * hs, a0 * px + b0 * pvx + a1 * x + b1 * vx, a0 * py + b0 * pvy + a1 * y + b1 * vy, zb + st.zStart,
        c0 * px + e0 * pvx + c1 * x + e1 * vx, c0 * py + e0 * pvy + c1 * y + e1 * vy, c0 * pz + e0 * pvz + c1 * z + e1 * vz, n);
      return zb === L ? Exit.forward : Exit.backward;
    }
    if (last) { storeCursor(c, t1, x, y, z + st.zStart, vx, vy, vz, n); return Exit.time; }
    if (--watchIn <= 0) {
      storeCursor(c, t1, x, y, z + st.zStart, vx, vy, vz, 0);
      observe(c, ctx, span0);
      watchIn = span0 = stepsToWatch(c, ctx, h);
    }
    if (gas !== null) {
      const b = ctx.batch, i = c.slot;
      b.vx[i] = vx; b.vy[i] = vy; b.vz[i] = vz;
      gas(b, i, h);
      vx = b.vx[i]; vy = b.vy[i]; vz = b.vz[i];
    }
  }
  storeCursor(c, tEntry + n * h, x, y, z + st.zStart, vx, vy, vz, n);
  return Exit.time;

  function vAt(t: number): number {
    return t >= tRampEnd ? Vto : V0 + rate * t;
  }
}
