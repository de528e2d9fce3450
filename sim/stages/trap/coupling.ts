// The ideal 3D RF trap in a coupled run: its field in the kicks (field.ts), the ring and end caps
// as electrodes; past an end cap, through its hole, the ion moves field-free to the stage's plane
// (the rule of kernel.ts). Stage-local z from the trap centre.

import { Place, type StageCoupling } from '../../core/coupling.js';
import { trapField } from './field.js';
import type { TrapStage } from './stage.js';

export function trapCoupling(st: TrapStage): StageCoupling {
  const r0sq = st.r0 * st.r0, z0sq2 = 2 * st.z0 * st.z0, ap2 = st.aperture * st.aperture;
  return {
    kick: trapField(st),
    flightEz: 0,
    rfHz: st.rf.frequency,
    place(x, y, z) {
      const r2 = x * x + y * y, zz = 2 * z * z;
      if (r2 - zz >= r0sq) return Place.hit;
      if (zz - r2 >= z0sq2) return r2 >= ap2 ? Place.hit : Place.free;
      return Place.inside;
    },
    plateBlocks: () => false,
  };
}
