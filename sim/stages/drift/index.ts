// Stage kind `drift`: a field-free tube with an optional aperture (closed-form flight,
// shared/uniform-kernel.ts).

import { Fate } from '../../core/batch.js';
import { APERTURE_FIELD, GAS_FIELD, LENGTH_FIELD } from '../../scene/fields.js';
import type { StageKind } from '../kind.js';
import { lengthMm } from '../shared/describe.js';
import { uniformField } from '../shared/uniform-field.js';
import { uniformCoupling } from '../shared/uniform-coupling.js';
import { trackUniform } from '../shared/uniform-kernel.js';
import type { DriftStage } from './stage.js';

/** Longest plausible field-free drift: TOF flight tubes run to a few metres (common practice, no source). */
const MAX_DRIFT_M = 10;

export const driftKind: StageKind<DriftStage> = {
  type: 'drift',
  entries: {
    drift: {
      fields: { length: LENGTH_FIELD, aperture: APERTURE_FIELD, gas: GAS_FIELD, detect_returning: { kind: 'enum', values: ['true', 'false'] } },
      required: ['length'],
      resolve(s, at) {
        const st: DriftStage = { type: 'drift', length: s.length, aperture: s.aperture ?? Infinity, zStart: at.z, zEnd: at.z + s.length };
        if (s.detect_returning === 'true') st.detectReturning = true;
        return [st];
      },
    },
  },
  holdsIons: false,
  hasRf: false,
  rf: () => undefined,
  field: (st) => uniformField(st.zStart, st.length, 0, st.aperture),
  coupling: (st) => uniformCoupling(st.length, 0, st.aperture),
  track: (st, c, ctx, run) => trackUniform(st, c, ctx, run.stepNoRf),
  // A reflectron's detector sits at the entrance of the drift the ions come back through.
  exitFate: (st, forward) => (!forward && st.detectReturning ? Fate.detected : undefined),
  exitAperture: (st) => (Number.isFinite(st.aperture) ? st.aperture : undefined),
  uniformField: true,
  gasPieces: false,
  fastPathKeys: new Set(['type', 'length', 'aperture', 'zStart', 'zEnd', 'sceneIndex', 'gas']),
  describe: (s) => `drift ${lengthMm(s)} mm`,
  outline: () => [{ shape: 'tube' }],
  electrodeLabels: (s) => [{ text: 'drift tube, field-free', at: [{ r: 1, rim: true, z: 0.5 * (typeof s.length === 'number' ? s.length : 0) }] }],
  plausibility: (st) => (st.length > MAX_DRIFT_M
    ? [`a drift of ${Number(st.length.toPrecision(4))} m is longer than the ${MAX_DRIFT_M} m of any flight tube in use (common practice, no source); check the unit`]
    : []),
  assumptions: ['Drift regions are field-free, with a hard aperture where one is given.'],
};
