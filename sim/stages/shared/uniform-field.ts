// Field model of a uniform axial field over a stage of length L (an acceleration gap, a
// reflectron, a source region; L's voltage 0 is a field-free drift):
//   Φ = −V·clamp(z, 0, L)/L,  E = (0, 0, V/L) inside,
// z measured from the stage entrance; a round aperture of radius R bounds it (Infinity: none).

import type { FieldModel, FieldTerm } from '../../core/field-model.js';

export function uniformField(zStart: number, length: number, voltage: number, aperture: number): FieldModel {
  const ap2 = aperture * aperture;
  const terms: FieldTerm[] = voltage === 0 ? [] : [{
    name: 'uniform', drive: () => voltage,
    unitPotential: (_x, _y, z) => -Math.min(Math.max(z, 0), length) / length,
    unitField: (_x, _y, z, out) => { out[0] = 0; out[1] = 0; out[2] = z >= 0 && z <= length ? 1 / length : 0; },
  }];
  const dcPotential = (_x: number, _y: number, z: number) => (voltage === 0 ? 0 : -(voltage * Math.min(Math.max(z, 0), length)) / length);
  return {
    terms, zRef: zStart, linear: voltage === 0, steady: true, drop: -voltage,
    dcPotential, potential: dcPotential,
    addAcceleration(_t, n, _x, _y, z, qm, _ax, _ay, az) {
      if (voltage === 0) return;
      const e = voltage / length;
      for (let i = 0; i < n; i++) if (z[i] >= 0 && z[i] <= length) az[i] += qm[i] * e;
    },
    outside: (x, y) => x * x + y * y >= ap2,
  };
}
