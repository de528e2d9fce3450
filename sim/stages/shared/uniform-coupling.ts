// A uniform-field stage (drift, acceleration gap, reflectron, source region) in a coupled run: its
// axial field E_z = V/L is advanced in closed form between the Coulomb kicks, so the crossing times of
// its planes are exact; a round aperture of radius R bounds it (Infinity: none), as in
// uniform-kernel.ts.

import { Place, type StageCoupling } from '../../core/coupling.js';

export function uniformCoupling(length: number, voltage: number, aperture: number): StageCoupling {
  const ap2 = aperture * aperture;
  return {
    kick: null,
    flightEz: voltage / length,
    place: (x, y) => (x * x + y * y >= ap2 ? Place.hit : Place.inside),
    plateBlocks: () => false,
  };
}
