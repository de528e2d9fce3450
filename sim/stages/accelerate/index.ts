// Stage kind `accelerate`: a uniform axial field between ideal grids. The scene file reaches it
// through three entries: `accelerate` (a plain gap), `reflectron` (a retarding field with a closed
// back plate) and `source` (the two-field Wiley–McLaren source: extraction, then acceleration).

import { Fate } from '../../core/batch.js';
import { APERTURE_FIELD, GAS_FIELD, LENGTH_FIELD, VOLTAGE_FIELD } from '../../scene/fields.js';
import type { StageKind } from '../kind.js';
import { lengthMm, num, voltLabel, volts } from '../shared/describe.js';
import { uniformField } from '../shared/uniform-field.js';
import { uniformCoupling } from '../shared/uniform-coupling.js';
import { trackUniform } from '../shared/uniform-kernel.js';
import type { AccelerateStage } from './stage.js';

/** Highest plausible potential step of a gap: TOF sources and reflectrons run to ~30 kV (common practice, no source). */
const MAX_GAP_V = 30e3;

const region = { kind: 'object', fields: { length: LENGTH_FIELD, voltage: VOLTAGE_FIELD }, required: ['length', 'voltage'] } as const;

const ROLE_LABEL: Record<string, string> = {
  gap: 'acceleration gap', reflectron: 'reflectron', 'source-extraction': 'extraction', 'source-acceleration': 'acceleration',
};

export const accelerateKind: StageKind<AccelerateStage> = {
  type: 'accelerate',
  entries: {
    reflectron: {
      fields: { length: LENGTH_FIELD, voltage: { kind: 'quantity', dim: 'voltage', positive: true }, aperture: APERTURE_FIELD, gas: GAS_FIELD },
      required: ['length', 'voltage'],
      // Retarding field: the potential rises by `voltage` towards the closed back plate.
      resolve: (s, at) => [{ type: 'accelerate', role: 'reflectron', closed: true, length: s.length, voltage: -s.voltage, aperture: s.aperture ?? Infinity, zStart: at.z, zEnd: at.z + s.length }],
    },
    source: {
      fields: { extraction: region, acceleration: region, aperture: APERTURE_FIELD, gas: GAS_FIELD },
      required: ['extraction', 'acceleration'],
      resolve(s, at) {
        // Two uniform-field regions (Wiley & McLaren 1955): extraction, then acceleration.
        const z1 = at.z + s.extraction.length;
        const ex: AccelerateStage = { type: 'accelerate', role: 'source-extraction', length: s.extraction.length, voltage: s.extraction.voltage, aperture: s.aperture ?? Infinity, zStart: at.z, zEnd: z1, sceneIndex: at.index };
        const acc: AccelerateStage = { type: 'accelerate', role: 'source-acceleration', length: s.acceleration.length, voltage: s.acceleration.voltage, aperture: s.aperture ?? Infinity, zStart: z1, zEnd: z1 + s.acceleration.length };
        return [ex, acc];
      },
    },
    accelerate: {
      fields: { length: LENGTH_FIELD, voltage: VOLTAGE_FIELD, aperture: APERTURE_FIELD, gas: GAS_FIELD },
      required: ['length', 'voltage'],
      resolve: (s, at) => [{ type: 'accelerate', role: 'gap', length: s.length, voltage: s.voltage, aperture: s.aperture ?? Infinity, zStart: at.z, zEnd: at.z + s.length }],
    },
  },
  holdsIons: false,
  hasRf: false,
  rf: () => undefined,
  field: (st) => uniformField(st.zStart, st.length, st.voltage, st.aperture),
  coupling: (st) => uniformCoupling(st.length, st.voltage, st.aperture),
  track: (st, c, ctx, run) => trackUniform(st, c, ctx, run.stepNoRf),
  // A reflectron's closed back plate: an ion that reaches it is lost.
  exitFate: (st, forward) => (forward && st.closed ? Fate.hit : undefined),
  exitAperture: (st) => (Number.isFinite(st.aperture) ? st.aperture : undefined),
  uniformField: true,
  gasPieces: false,
  describe: (s) => `${s.role === 'reflectron' ? 'reflectron' : 'acceleration'} ${lengthMm(s)} mm${typeof s.voltage === 'number' ? `, ${volts(s.voltage)}` : ''}`,
  outline: (s) => [{ shape: s.role === 'reflectron' ? 'ring-stack' : 'grid-gap' }],
  electrodeLabels(s) {
    // Only the potential difference across a uniform-field region is defined by the stage, so each
    // label carries the drop across its own region: at the back plate for a reflectron (whose
    // stored voltage is negative, retarding), at the entrance grid otherwise.
    const v = Math.abs(num(s.voltage) ?? 0), len = num(s.length) ?? 0;
    const name = ROLE_LABEL[String(s.role)] ?? ROLE_LABEL.gap;
    return [{ text: `${name} ${voltLabel(v)}`, at: [{ r: 1, rim: true, z: s.role === 'reflectron' ? len : 0 }] }];
  },
  plausibility: (st) => (Math.abs(st.voltage) > MAX_GAP_V
    ? [`${Number((Math.abs(st.voltage) / 1e3).toPrecision(4))} kV across the ${st.role ?? 'gap'} is above the ~${MAX_GAP_V / 1e3} kV of TOF sources and reflectrons in use (common practice, no source); check the unit`]
    : []),
  assumptions: ['Acceleration, source and reflectron regions are uniform fields between ideal, fully transparent grids: no grid scattering, no field penetration through the meshes.'],
};
