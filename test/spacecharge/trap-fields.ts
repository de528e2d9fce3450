// The ideal trap's field model (sim/stages/trap/field.ts) centred on z = 0, for the ensemble tests.
import { trapField } from '../../sim/stages/trap/field.js';
import type { FieldModel } from '../../sim/core/field-model.js';

export function centredTrapField(r0: number, z0: number, dcVolts: number, rfVolts: number, rfHz: number): FieldModel {
  return trapField({
    type: 'trap', r0, z0, dc: dcVolts, rf: { amplitude: rfVolts, frequency: rfHz, phase: 0 },
    aperture: Math.min(1e-3, r0 / 4), zStart: -z0, zEnd: z0, length: 2 * z0,
  });
}
