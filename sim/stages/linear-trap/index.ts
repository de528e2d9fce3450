// Stage kind `linear-trap`: a linear quadrupole ion trap (stage.ts, field.ts, kernel.ts): four rods
// with RF (and optional DC), an ideal harmonic axial well from DC end electrodes, supplementary
// dipolar AC across the x rods, an RF ramp for mass scans with radial ejection through the x rods.

import { GAS_FIELD, LENGTH_FIELD, RF_FIELD, VOLTAGE_FIELD, resolveRf } from '../../scene/fields.js';
import type { StageKind } from '../kind.js';
import { dcPlusRf, lengthMm, mm2, num, rfAmplitude, storedStage, voltLabel } from '../shared/describe.js';
import { r0Plausibility } from '../shared/plausible.js';
import { linearTrapAx, linearTrapMzPerVolt, linearTrapQx } from '../../mathieu/linear-trap.js';
import { linearTrapCoupling } from './coupling.js';
import { linearTrapField } from './field.js';
import { trackLinearTrap } from './kernel.js';
import type { LinearTrapStage } from './stage.js';

export const linearTrapKind: StageKind<LinearTrapStage> = {
  type: 'linear-trap',
  entries: {
    'linear-trap': {
      fields: {
        r0: LENGTH_FIELD, length: LENGTH_FIELD, rf: RF_FIELD, dc: VOLTAGE_FIELD, end_dc: VOLTAGE_FIELD,
        // No default: κ depends on the rods' and end electrodes' shapes and gaps, so it comes from a
        // field solution (iontrail field) or a measured axial frequency.
        kappa: { kind: 'number', positive: true, max: 1 },
        gas: GAS_FIELD,
        aux: {
          kind: 'object',
          fields: { amplitude: { kind: 'quantity', dim: 'voltage', nonNegative: true }, frequency: { kind: 'quantity', dim: 'frequency', positive: true }, phase: { kind: 'quantity', dim: 'angle' } },
          required: ['amplitude', 'frequency'],
        },
      },
      required: ['r0', 'length', 'rf', 'end_dc', 'kappa'],
      resolve(s, at) {
        if (!(s.end_dc > 0)) at.fail('end_dc', `must be positive to close the axial well for positive ions (a voltage such as 10 V), got ${s.end_dc} V`);
        const st: LinearTrapStage = {
          type: 'linear-trap', r0: s.r0, z0: s.length / 2, length: s.length, rf: resolveRf(s.rf), dc: s.dc ?? 0,
          endDc: s.end_dc, kappa: s.kappa, zStart: at.z, zEnd: at.z + s.length,
        };
        if (s.aux) st.aux = { amplitude: s.aux.amplitude, frequency: s.aux.frequency, phase: s.aux.phase ?? 0 };
        return [st];
      },
    },
  },
  holdsIons: true,
  hasRf: true,
  rf: (st) => st.rf,
  field: linearTrapField,
  coupling: linearTrapCoupling,
  adaptiveUnavailable: 'the linear-trap kernel has no adaptive form yet',
  track: (st, c, ctx, run) => trackLinearTrap(st, c, ctx, run.stepsPerCycle),
  exitFate: () => undefined,
  // The ideal well is closed at both ends: nothing leaves through the exit plane.
  exitAperture: () => undefined,
  uniformField: false,
  gasPieces: true,
  // Mass scans eject radially through the x rods (kernel.ts: Exit.detected).
  massScan: (st) => (st.rf.ramp === undefined ? undefined : {
    qKey: 'qx', ejection: 'radially onto an x rod (through its slot, the ideal well having no opening along z)', rf: st.rf, ...(st.aux ? { aux: st.aux } : {}),
    a: (mz) => linearTrapAx({ r0: st.r0, z0: st.z0, freq: st.rf.frequency, dc: st.dc, endDc: st.endDc, kappa: st.kappa, mz }),
    q: (amplitude, mz) => linearTrapQx(st.r0, st.rf.frequency, amplitude, mz),
    mzPerVolt: (qEject) => linearTrapMzPerVolt(st.r0, st.rf.frequency, qEject),
  }),
  describe(s) {
    const d = storedStage(s);
    return `linear trap ${lengthMm(s)} mm, r0 ${mm2(s.r0)} mm, end electrodes ${voltLabel(num(d.endDc) ?? 0)} (κ ${num(d.kappa) ?? '?'})`;
  },
  outline: () => [{ shape: 'rod-set', reachR0: 1.5 }, { shape: 'grid-gap' }],
  electrodeLabels(s) {
    const r0 = num(s.r0) ?? 0, len = num(s.length) ?? 0;
    const v = dcPlusRf(num(s.dc) ?? 0, rfAmplitude(s));
    const wrap = v.includes(' + ') ? `(${v})` : v;
    const aux = s.aux as Readonly<Record<string, unknown>> | undefined;
    const ac = num(aux?.amplitude);
    return [
      { text: `rods x +${wrap}${ac ? ` + ${voltLabel(ac)} AC across, slotted` : ', slotted'}`, at: [{ r: 1.6 * r0, z: 0.62 * len, azimuths: [0, Math.PI] }] },
      { text: `rods y −${wrap}`, at: [{ r: 1.6 * r0, z: 0.38 * len, azimuths: [Math.PI / 2, -Math.PI / 2] }] },
      { text: `end electrodes ${voltLabel(num(s.endDc) ?? 0)}`, at: [{ r: 0.8 * r0, z: 0 }, { r: 0.8 * r0, z: len }] },
    ];
  },
  plausibility: (st) => r0Plausibility(st.r0, 'linear ion traps'),
  assumptions: ['Linear traps: ideal quadrupole rods, the end electrodes as the ideal harmonic well κ·U_end·(2z² − x² − y²)/(2 z0²) (κ from the scene, not computed), the supplementary AC as the uniform field A/(2 r0); an ion reaching r0 at an x rod counts as ejected through its slot onto the detector.'],
};
