// The ideal quadrupole in a coupled run: its field in the kicks (field.ts), the rods' inscribed
// circle as the electrode test and the entrance and exit plates of apertures.ts.

import { Place, type StageCoupling } from '../../core/coupling.js';
import { entranceRadius, exitRadius, outsideHole } from './apertures.js';
import { quadrupoleField } from './field.js';
import type { QuadrupoleStage } from './stage.js';

export function quadrupoleCoupling(st: QuadrupoleStage): StageCoupling {
  const r0sq = st.r0 * st.r0, rIn = entranceRadius(st), rOut = exitRadius(st);
  return {
    kick: quadrupoleField(st),
    flightEz: 0,
    rfHz: st.rf.frequency,
    place: (x, y) => (x * x + y * y >= r0sq ? Place.hit : Place.inside),
    plateBlocks: (x, y, exit) => outsideHole(x, y, exit ? rOut : rIn),
  };
}
