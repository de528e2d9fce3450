// A solved electrodes stage for the adaptive driver (shared/adaptive.ts): the equations of
// kernel.ts, ẍ = −(q/m) ∇(Φ_dc + V(t) cos(Ω(t + τ) + φ) Φ_rf + A cos(ω_a t + φ_a) Φ_aux), with the
// drives evaluated directly (Dormand–Prince steps are not commensurate with the RF period), the
// gradient of the same interpolant or series (SolvedField.gradient), and the rules of kernel.ts:
// hit where the ion enters an electrode or leaves the grid sideways, out through the end planes.
// Where a step ends inside an electrode, the ion is placed on the chord's crossing, as the RK4
// kernel does, at the time and state of the step's dense output there; past an end plane, at the
// time the dense output's path meets the plane (Newton from the chord's crossing).
//
// Error control alone lets a step grow far beyond a grid cell where the field is weak (a grounded
// drift region), and a test at the step's end only would then carry an ion straight through a
// thin electrode (an aperture plate) that the RK4 kernel's short steps hit. So a step that moves
// the ion more than one grid spacing is looked along: the dense output (Hairer, Nørsett & Wanner,
// §II.6, accurate to the step's own order) is tested at sub-points no more than a spacing apart,
// and the first sub-chord that ends inside an electrode is the one the ion is landed on. A plate
// at least one spacing thick (the grid cannot resolve a thinner one) cannot fall between two
// sub-points on a path that is straight within the sub-interval.

import { Exit, storeCursor, type ExitCode, type IonCursor, type StepContext } from '../../core/cursor.js';
import type { Dopri5 } from '../../integrate/dopri5.js';
import { trackAdaptive, type AdaptiveStage } from '../shared/adaptive.js';
import type { ElectrodesStage } from './stage.js';
import { solvedFieldOf } from './solution.js';

export function adaptiveElectrodes(st: ElectrodesStage, c: IonCursor, ctx: StepContext): AdaptiveStage {
  const F = solvedFieldOf(st);
  const rf = st.rf, withRf = rf !== undefined && F.oRf > 0;
  const omega = withRf ? 2 * Math.PI * rf.frequency : 0, ph = withRf ? omega * c.tau + rf.phase : 0;
  const V0 = withRf ? rf.amplitude : 0, ramp = withRf ? rf.ramp : undefined;
  const rate = ramp ? (ramp.to - V0) / ramp.over : 0;
  const aux = F.oAux > 0 ? st.aux : undefined;
  const A = aux ? aux.amplitude : 0, wA = aux ? 2 * Math.PI * aux.frequency : 0, phA = aux ? aux.phase : 0;
  const qm = c.q / c.m, L = st.length, zMax = F.zMax;
  const g = new Float64Array(3);
  // Chord ends of the last step (stage-local), for the landing.
  let e = -1;
  const p = new Float64Array(3);
  const q3 = new Float64Array(3);
  // The sub-interval of the last step whose end is inside electrode e (the whole step unless looked along).
  let ta = 0, tb = 0;
  const h = F.grid.spacing;
  /** Along the step tPrev → t when it moves more than a spacing: the first sub-point inside an electrode. */
  const along = (s: Float64Array, tPrev: number, t: number, sol: Dopri5): number => {
    const x0 = sol.dense(0, tPrev), y0 = sol.dense(1, tPrev), z0 = sol.dense(2, tPrev);
    const n = Math.ceil(Math.hypot(s[0] - x0, s[1] - y0, s[2] - z0) / h);
    let tl = tPrev;
    for (let k = 1; k < n; k++) {
      const tk = tPrev + (k / n) * (t - tPrev);
      const zk = sol.dense(2, tk);
      if (zk >= L || zk < 0) break; // out through an end plane first: test() lands it there
      const k0 = F.electrodeAt(sol.dense(0, tk), sol.dense(1, tk), zk);
      if (k0 >= 0) { ta = tl; tb = tk; return k0; }
      tl = tk;
    }
    ta = tl; tb = t;
    return -1;
  };
  const drive = (t: number) => (withRf ? (ramp ? (t >= ramp.over ? ramp.to : V0 + rate * t) : V0) * Math.cos(omega * t + ph) : 0);
  return {
    f: (t, s, d) => {
      d[0] = s[3]; d[1] = s[4]; d[2] = s[5];
      // A stage point past an end plane takes the field of the plane, as in kernel.ts.
      const z = s[2] > zMax ? zMax : s[2] < 0 ? 0 : s[2];
      if (F.gradient(s[0], s[1], z, drive(t), aux ? A * Math.cos(wA * t + phA) : 0, g)) {
        d[3] = -qm * g[0]; d[4] = -qm * g[1]; d[5] = -qm * g[2];
      } else { d[3] = 0; d[4] = 0; d[5] = 0; } // outside the grid: test() ends the flight there
    },
    zc: st.zStart,
    scale: F.reach > 0 ? F.reach : L,
    period: withRf ? 1 / rf.frequency : Math.max(L / Math.max(Math.abs(c.vz), 1), 1e-9),
    tEnd: ctx.maxTime, exitsAtTEnd: false, throughCap: false,
    zStart: st.zStart, zEnd: st.zEnd,
    test: (s, tPrev, t, sol) => {
      e = along(s, tPrev, t, sol);
      if (e < 0) e = F.electrodeAt(s[0], s[1], s[2]);
      if (e >= 0) return Exit.hit;
      const z = s[2] > zMax ? zMax : s[2] < 0 ? 0 : s[2];
      if (!F.gradient(s[0], s[1], z, 0, 0, g)) { e = -1; return Exit.hit; }
      if (s[2] >= L) return Exit.forward;
      if (s[2] < 0) return Exit.backward;
      return 0;
    },
    land(code: ExitCode, tPrev: number, t: number, s: Float64Array, sol: Dopri5): number {
      let tk: number;
      if (code === Exit.hit && e >= 0) {
        // The sub-chord that entered electrode e (the whole step when it moved less than a spacing).
        for (let i = 0; i < 3; i++) { p[i] = sol.dense(i, ta); q3[i] = tb === t ? s[i] : sol.dense(i, tb); }
        tk = ta + F.entryFraction(e, p[0], p[1], p[2], q3[0], q3[1], q3[2]) * (tb - ta);
      } else if (code === Exit.forward || code === Exit.backward) {
        const zb = code === Exit.forward ? L : 0, z0 = sol.dense(2, tPrev);
        tk = tPrev + ((zb - z0) / (s[2] - z0)) * (t - tPrev);
        // From the chord's crossing to the path's: Newton on z(t) = zb with ż = vz, both from the
        // dense output, kept within the step (z is monotonic across a crossing step unless vz
        // nearly vanishes there). Landing at the chord's time instead leaves the ion's energy on the
        // plane off by q·|∇Φ|·(the chord's error in z): 1e-5 to 2e-4 of it where a tube meets the
        // grounded face (test/solved/dopri5.test.ts).
        for (let k = 0; k < 8; k++) {
          const vz = sol.dense(5, tk);
          if (vz === 0) break;
          const dt = (sol.dense(2, tk) - zb) / vz;
          tk = Math.min(t, Math.max(tPrev, tk - dt));
          if (Math.abs(dt) <= 1e-14 * (t - tPrev)) break;
        }
      } else return t; // the grid's side: stopped at the end of the step, as the RK4 kernel's step start
      for (let i = 0; i < 6; i++) s[i] = sol.dense(i, tk);
      if (code === Exit.forward) s[2] = L; else if (code === Exit.backward) s[2] = 0;
      return tk;
    },
  };
}

/** The adaptive flight through the stage; an ion that starts inside an electrode is lost at once (kernel.ts). */
export function trackElectrodesAdaptive(st: ElectrodesStage, c: IonCursor, ctx: StepContext, tolerance: number): ExitCode {
  if (solvedFieldOf(st).electrodeAt(c.x, c.y, c.z - st.zStart) >= 0) { storeCursor(c, c.t, c.x, c.y, c.z, c.vx, c.vy, c.vz, 0); return Exit.hit; }
  return trackAdaptive(adaptiveElectrodes(st, c, ctx), c, ctx, tolerance);
}
