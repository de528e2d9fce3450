// The linear trap in a coupled (space-charge) run: its field in the kicks (field.ts), and the
// electrode rules of its kernel: an ion reaching r = r0 nearer an x rod leaves through that rod's
// slot onto the detector (detected, as a mass scan ejects), nearer a y rod it strikes the rod, and
// at |z| = z0 it strikes an end electrode (the ideal well has no opening). Stage-local z from the
// trap centre.

import { Place, type StageCoupling } from '../../core/coupling.js';
import { linearTrapField } from './field.js';
import type { LinearTrapStage } from './stage.js';

export function linearTrapCoupling(st: LinearTrapStage): StageCoupling {
  const r0sq = st.r0 * st.r0, z0 = st.z0;
  return {
    kick: linearTrapField(st),
    flightEz: 0,
    rfHz: st.rf.frequency,
    place(x, y, z) {
      const xx = x * x, yy = y * y;
      if (xx + yy >= r0sq) return xx >= yy ? Place.detected : Place.hit;
      if (z >= z0 || z <= -z0) return Place.hit;
      return Place.inside;
    },
    // The end electrodes close both end planes: crossing one is striking it.
    plateBlocks: () => true,
  };
}
