// Stage kind `trap`: the ideal 3D RF (Paul) trap with end-cap holes, RF ramp and supplementary
// dipolar AC (stage.ts, field.ts, kernel.ts, scan.ts).

import { APERTURE_FIELD, GAS_FIELD, LENGTH_FIELD, RF_FIELD, VOLTAGE_FIELD, resolveRf } from '../../scene/fields.js';
import type { StageKind } from '../kind.js';
import { trapCoupling } from './coupling.js';
import { trackAdaptive } from '../shared/adaptive.js';
import { dcPlusRf, mm2, num, rfAmplitude, voltLabel } from '../shared/describe.js';
import { r0Plausibility } from '../shared/plausible.js';
import { adaptiveTrap } from './adaptive.js';
import { trapField } from './field.js';
import { trackTrap } from './kernel.js';
import type { TrapStage } from './stage.js';
import { trapAz, trapMzPerVolt, trapQz } from '../../mathieu/parameters.js';

export const trapKind: StageKind<TrapStage> = {
  type: 'trap',
  entries: {
    trap: {
      fields: {
        r0: LENGTH_FIELD, z0: LENGTH_FIELD, length: LENGTH_FIELD, rf: RF_FIELD, dc: VOLTAGE_FIELD, aperture: APERTURE_FIELD, gas: GAS_FIELD,
        aux: {
          kind: 'object',
          fields: { amplitude: { kind: 'quantity', dim: 'voltage', nonNegative: true }, frequency: { kind: 'quantity', dim: 'frequency', positive: true }, phase: { kind: 'quantity', dim: 'angle' } },
          required: ['amplitude', 'frequency'],
        },
      },
      required: ['r0', 'rf'],
      resolve(s, at) {
        const z0 = s.z0 ?? s.r0 / Math.SQRT2;
        const len = s.length ?? 2 * z0;
        if (len < 2 * z0) at.fail('length', `must be at least 2·z0 = ${(2 * z0 * 1e3).toPrecision(4)} mm (a length such as 10 mm)`);
        const st: TrapStage = { type: 'trap', r0: s.r0, z0, length: len, rf: resolveRf(s.rf), dc: s.dc ?? 0, aperture: s.aperture ?? Math.min(1e-3, s.r0 / 4), zStart: at.z, zEnd: at.z + len };
        if (s.aux) st.aux = { amplitude: s.aux.amplitude, frequency: s.aux.frequency, phase: s.aux.phase ?? 0 };
        return [st];
      },
    },
  },
  holdsIons: true,
  hasRf: true,
  analyzer: 'trap',
  rf: (st) => st.rf,
  field: trapField,
  coupling: trapCoupling,
  track: (st, c, ctx, run) => (run.integrator === 'dopri5'
    ? trackAdaptive(adaptiveTrap(st, c, ctx), c, ctx, run.tolerance)
    : trackTrap(st, c, ctx, run.stepsPerCycle)),
  exitFate: () => undefined,
  // Ions leave through the end-cap hole; the exit plane is at the end cap's apex.
  exitAperture: (st) => st.aperture,
  uniformField: false,
  gasPieces: true,
  operatingPoint: (st) => ({ analyzer: 'trap', r0: st.r0, z0: st.z0, freq: st.rf.frequency, rf: st.rf.amplitude, dc: st.dc }),
  // Mass-selective scans eject along z (sim/analysis/trap-scan.ts).
  massScan: (st) => (st.rf.ramp === undefined ? undefined : {
    qKey: 'qz', ejection: 'along z through the far end cap within its aperture', rf: st.rf, ...(st.aux ? { aux: st.aux } : {}),
    a: (mz) => trapAz(st.r0, st.z0, st.rf.frequency, st.dc, mz),
    q: (amplitude, mz) => trapQz(st.r0, st.z0, st.rf.frequency, amplitude, mz),
    mzPerVolt: (qEject) => trapMzPerVolt(st.r0, st.z0, st.rf.frequency, qEject),
  }),
  describe: (s) => `RF trap r0 ${mm2(s.r0)} mm, z0 ${mm2(s.z0)} mm`,
  outline: () => [{ shape: 'hyperbolic-trap', reachR0: 1 }],
  electrodeLabels(s) {
    // Ring at U + V cos Ωt, end caps grounded (DESIGN.md), the supplementary AC between the caps.
    // Anchors inside the ring body on its mid-plane and behind each cap face, about the centre.
    const r0 = num(s.r0) ?? 0, z0 = num(s.z0) ?? r0 / Math.SQRT2, zc = (num(s.length) ?? 2 * z0) / 2;
    const aux = s.aux as Readonly<Record<string, unknown>> | undefined;
    const ac = num(aux?.amplitude);
    const caps = `end caps 0 V${ac ? ` + ${voltLabel(ac)} AC cap to cap` : ''}`;
    const capZ = Math.sqrt(z0 * z0 + 0.32 * r0 * r0) + 0.1 * z0;
    return [
      { text: `ring ${dcPlusRf(num(s.dc) ?? 0, rfAmplitude(s))}`, at: [{ r: 1.4 * r0, z: zc }] },
      { text: caps, at: [{ r: 0.8 * r0, z: zc + capZ }, { r: 0.8 * r0, z: zc - capZ }] },
    ];
  },
  plausibility: (st) => r0Plausibility(st.r0, 'RF ion traps'),
  assumptions: ['No field perturbation by the end-cap holes or the finite size of ring and end caps: the trap field is the ideal quadrupole everywhere inside.'],
};
