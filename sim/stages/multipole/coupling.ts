// The ideal multipole in a coupled (space-charge) run: its field in the kicks (field.ts) and the
// rods' inscribed circle r = r0 as the electrode test, as in its kernel. No plates.

import { Place, type StageCoupling } from '../../core/coupling.js';
import { multipoleField } from './field.js';
import type { MultipoleStage } from './stage.js';

export function multipoleCoupling(st: MultipoleStage): StageCoupling {
  const r0sq = st.r0 * st.r0;
  return {
    kick: multipoleField(st),
    flightEz: 0,
    rfHz: st.rf.frequency,
    place: (x, y) => (x * x + y * y >= r0sq ? Place.hit : Place.inside),
    plateBlocks: () => false,
  };
}
