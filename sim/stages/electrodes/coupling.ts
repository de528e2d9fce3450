// A solved electrodes stage in a coupled (space-charge) run: the superposition of its unit
// solutions in the kicks (field.ts), and the real electrode shapes (or the grounded box edge) as
// the loss test, as in the uncoupled kernel. The stage has no plates of its own: an entrance plate
// is one of its electrodes.

import { Place, type StageCoupling } from '../../core/coupling.js';
import { electrodesField } from './field.js';
import type { ElectrodesStage } from './stage.js';

export function electrodesCoupling(st: ElectrodesStage): StageCoupling {
  const field = electrodesField(st);
  return {
    kick: field,
    flightEz: 0,
    ...(st.rf ? { rfHz: st.rf.frequency } : {}),
    place: (x, y, z) => (field.outside(x, y, z) ? Place.hit : Place.inside),
    plateBlocks: () => false,
  };
}
