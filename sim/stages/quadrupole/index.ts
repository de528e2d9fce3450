// Stage kind `quadrupole`: the ideal hyperbolic mass filter (stage.ts, field.ts, kernel.ts).

import { Exit } from '../../core/cursor.js';
import { APERTURE_FIELD, GAS_FIELD, LENGTH_FIELD, RF_FIELD, VOLTAGE_FIELD, resolveRf } from '../../scene/fields.js';
import type { StageKind } from '../kind.js';
import { quadrupoleCoupling } from './coupling.js';
import { trackAdaptive } from '../shared/adaptive.js';
import { adaptiveQuadrupole } from './adaptive.js';
import { quadrupoleField } from './field.js';
import { trackQuadrupole } from './kernel.js';
import type { QuadrupoleStage } from './stage.js';
import { dcPlusRf, lengthMm, mm2, num, rfAmplitude } from '../shared/describe.js';
import { r0Plausibility } from '../shared/plausible.js';
import { blockedOnEntry, exitRadius, throughExitPlate } from './apertures.js';

export const quadrupoleKind: StageKind<QuadrupoleStage> = {
  type: 'quadrupole',
  entries: {
    quadrupole: {
      fields: {
        length: LENGTH_FIELD, r0: LENGTH_FIELD, rf: RF_FIELD, dc: VOLTAGE_FIELD, gas: GAS_FIELD,
        entrance_aperture: APERTURE_FIELD, exit_aperture: APERTURE_FIELD,
      },
      required: ['length', 'r0', 'rf'],
      resolve(s, at) {
        const st: QuadrupoleStage = { type: 'quadrupole', length: s.length, r0: s.r0, rf: resolveRf(s.rf), dc: s.dc ?? 0, zStart: at.z, zEnd: at.z + s.length };
        // Kept only when given, so that a sweep of r0 moves the default holes with the rods.
        if (s.entrance_aperture !== undefined) st.entranceAperture = s.entrance_aperture;
        if (s.exit_aperture !== undefined) st.exitAperture = s.exit_aperture;
        return [st];
      },
    },
  },
  holdsIons: false,
  hasRf: true,
  analyzer: 'quadrupole',
  rf: (st) => st.rf,
  field: quadrupoleField,
  coupling: quadrupoleCoupling,
  track(st, c, ctx, run) {
    // The entrance and exit plates (apertures.ts), then the rods.
    if (blockedOnEntry(st, c)) return Exit.hit;
    const code = run.integrator === 'dopri5'
      ? trackAdaptive(adaptiveQuadrupole(st, c, ctx), c, ctx, run.tolerance)
      : trackQuadrupole(st, c, ctx, run.stepsPerCycle);
    return throughExitPlate(st, c, code);
  },
  exitFate: () => undefined,
  exitAperture: exitRadius,
  uniformField: false,
  gasPieces: false,
  fastPathKeys: new Set(['type', 'length', 'r0', 'rf', 'dc', 'zStart', 'zEnd', 'sceneIndex', 'gas', 'entranceAperture', 'exitAperture']),
  operatingPoint: (st) => ({ analyzer: 'quadrupole', r0: st.r0, z0: undefined, freq: st.rf.frequency, rf: st.rf.amplitude, dc: st.dc }),
  describe: (s) => `quadrupole ${lengthMm(s)} mm, r0 ${mm2(s.r0)} mm`,
  outline: () => [{ shape: 'rod-set', reachR0: 1.5 }],
  electrodeLabels(s) {
    // Rods at ±(U + V cos Ωt) (DESIGN.md): the x pair carries +, the y pair −. Anchors sit inside
    // the rod bodies (hyperbolic and round rods both span 1.6·r0), staggered along z.
    const r0 = num(s.r0) ?? 0, len = num(s.length) ?? 0;
    const v = dcPlusRf(num(s.dc) ?? 0, rfAmplitude(s));
    const wrap = v.includes(' + ') ? `(${v})` : v;
    return [
      { text: `rods x +${wrap}`, at: [{ r: 1.6 * r0, z: 0.62 * len, azimuths: [0, Math.PI] }] },
      { text: `rods y −${wrap}`, at: [{ r: 1.6 * r0, z: 0.38 * len, azimuths: [Math.PI / 2, -Math.PI / 2] }] },
    ];
  },
  plausibility: (st) => r0Plausibility(st.r0, 'quadrupole mass filters'),
  assumptions: ['No fringe fields: an ion meets the full RF and DC the moment it enters a filter stage, and none the moment it leaves.'],
};
