// The quadrupole for the adaptive driver (shared/adaptive.ts): the equations of kernel.ts,
//   ẍ = −g x, ÿ = +g y, z̈ = 0, g = 2q(U + V cos(Ωt + Ωτ + φ))/(m r0²),
// with vz constant, so the exit time is known and the integration ends exactly there.

import { Exit, type IonCursor, type StepContext } from '../../core/cursor.js';
import type { AdaptiveStage } from '../shared/adaptive.js';
import type { QuadrupoleStage } from './stage.js';

export function adaptiveQuadrupole(st: QuadrupoleStage, c: IonCursor, ctx: StepContext): AdaptiveStage {
  const omega = 2 * Math.PI * st.rf.frequency;
  const k = (2 * c.q) / (c.m * st.r0 * st.r0);
  const U = st.dc, V = st.rf.amplitude, ph = omega * c.tau + st.rf.phase;
  const tExit = c.vz > 0 ? (st.zEnd - c.z) / c.vz : c.vz < 0 ? (st.zStart - c.z) / c.vz : Infinity;
  const r0sq = st.r0 * st.r0;
  return {
    f: (t, s, d) => {
      const g = k * (U + V * Math.cos(omega * t + ph));
      d[0] = s[3]; d[1] = s[4]; d[2] = s[5];
      d[3] = -g * s[0]; d[4] = g * s[1]; d[5] = 0;
    },
    zc: 0, scale: st.r0, period: 1 / st.rf.frequency,
    tEnd: Math.min(ctx.maxTime, c.t + tExit), exitsAtTEnd: true, throughCap: false,
    zStart: st.zStart, zEnd: st.zEnd,
    test: (s) => (s[0] * s[0] + s[1] * s[1] >= r0sq ? Exit.hit : 0),
  };
}
