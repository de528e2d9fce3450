// The RF trap for the adaptive driver (shared/adaptive.ts): the equations of kernel.ts,
//   ẍ = −g x, ÿ = −g y, z̈' = 2g z' + (q A/(2 z0 m)) cos(ω_aux t + φ_aux),
//   g = 2q(U + V(t) cos(Ωt + Ωτ + φ))/(m (r0² + 2z0²)), V(t) ramped on the run clock,
// with the ring and end-cap tests of kernel.ts; an ion through a cap hole leaves the trap.

import { Exit, type IonCursor, type StepContext } from '../../core/cursor.js';
import type { AdaptiveStage } from '../shared/adaptive.js';
import type { TrapStage } from './stage.js';

export function adaptiveTrap(st: TrapStage, c: IonCursor, ctx: StepContext): AdaptiveStage {
  const omega = 2 * Math.PI * st.rf.frequency;
  const k = (2 * c.q) / (c.m * (st.r0 * st.r0 + 2 * st.z0 * st.z0));
  const U = st.dc, V0 = st.rf.amplitude, ph = omega * c.tau + st.rf.phase;
  const ramp = st.rf.ramp;
  const rate = ramp ? (ramp.to - V0) / ramp.over : 0;
  const aux = st.aux;
  const kA = aux ? (c.q * aux.amplitude) / (2 * st.z0 * c.m) : 0;
  const wA = aux ? 2 * Math.PI * aux.frequency : 0, phA = aux ? aux.phase : 0;
  const r0sq = st.r0 * st.r0, z0sq2 = 2 * st.z0 * st.z0, ap2 = st.aperture * st.aperture;
  return {
    f: (t, s, d) => {
      const V = ramp ? (t >= ramp.over ? ramp.to : V0 + rate * t) : V0;
      const g = k * (U + V * Math.cos(omega * t + ph));
      d[0] = s[3]; d[1] = s[4]; d[2] = s[5];
      d[3] = -g * s[0]; d[4] = -g * s[1]; d[5] = 2 * g * s[2] + (aux ? kA * Math.cos(wA * t + phA) : 0);
    },
    zc: 0.5 * (st.zStart + st.zEnd), scale: st.r0, period: 1 / st.rf.frequency,
    tEnd: ctx.maxTime, exitsAtTEnd: false, throughCap: true,
    zStart: st.zStart, zEnd: st.zEnd,
    test: (s) => {
      const r2 = s[0] * s[0] + s[1] * s[1];
      const zz2 = 2 * s[2] * s[2];
      if (r2 - zz2 >= r0sq) return Exit.hit;
      if (zz2 - r2 >= z0sq2) return r2 >= ap2 ? Exit.hit : s[5] > 0 ? Exit.forward : Exit.backward;
      return 0;
    },
  };
}
