// Stage kind `multipole`: the ideal RF multipole of 2n rods (stage.ts, field.ts, kernel.ts), an
// ion guide in vacuum or a collision cell / cooling guide with a gas block.

import { GAS_FIELD, LENGTH_FIELD, RF_FIELD, VOLTAGE_FIELD, resolveRf } from '../../scene/fields.js';
import type { StageKind } from '../kind.js';
import { dcPlusRf, lengthMm, mm2, num, rfAmplitude, storedStage } from '../shared/describe.js';
import { r0Plausibility } from '../shared/plausible.js';
import { multipoleField } from './field.js';
import { trackMultipole } from './kernel.js';
import { multipoleCoupling } from './coupling.js';
import type { MultipoleStage } from './stage.js';
import { multipoleEffectivePotential } from '../../mathieu/multipole.js';

/** Names of the common rod sets (the trade's words), by number of rods. */
const ROD_SET_NAMES: Readonly<Record<number, string>> = { 4: 'quadrupole', 6: 'hexapole', 8: 'octupole', 10: 'decapole', 12: 'dodecapole' };

export const rodSetName = (poles: number): string => ROD_SET_NAMES[poles] ?? `${poles}-pole`;

export const multipoleKind: StageKind<MultipoleStage> = {
  type: 'multipole',
  entries: {
    multipole: {
      fields: {
        poles: { kind: 'number', integer: true, min: 4 },
        length: LENGTH_FIELD, r0: LENGTH_FIELD, rf: RF_FIELD, dc: VOLTAGE_FIELD, gas: GAS_FIELD,
      },
      required: ['poles', 'length', 'r0', 'rf'],
      resolve(s, at) {
        if (s.poles % 2 !== 0) at.fail('poles', `expects an even number of rods (4, 6, 8, ...), got '${s.poles}'`);
        if (s.rf.ramp) at.fail(['rf', 'ramp'], 'is not applied in a multipole guide (a ramp belongs to a trap stage): remove it');
        return [{ type: 'multipole', poles: s.poles, length: s.length, r0: s.r0, rf: resolveRf(s.rf), dc: s.dc ?? 0, zStart: at.z, zEnd: at.z + s.length }];
      },
    },
  },
  holdsIons: false,
  hasRf: true,
  rf: (st) => st.rf,
  field: multipoleField,
  coupling: multipoleCoupling,
  adaptiveUnavailable: 'the multipole kernel has no adaptive form yet',
  track: (st, c, ctx, run) => trackMultipole(st, c, ctx, run.stepsPerCycle),
  exitFate: () => undefined,
  // The exit plane is open; the rods' inscribed circle bounds it.
  exitAperture: (st) => st.r0,
  uniformField: false,
  gasPieces: true,
  effectivePotential(s, mz, charge) {
    const poles = num(s.poles), r0 = num(s.r0), rf = s.rf as Readonly<Record<string, unknown>> | undefined;
    const V = num(rf?.amplitude), f = num(rf?.frequency);
    if (poles === undefined || r0 === undefined || V === undefined || f === undefined || V === 0 || num(s.dc)) return undefined;
    return { at: multipoleEffectivePotential(poles, r0, f, V, mz, charge), r0, label: `${rodSetName(poles)} V*(r) ∝ (r/r0)^${poles - 2} (Gerlich 1992)` };
  },
  describe: (s) => `${rodSetName(num(storedStage(s).poles) ?? 0)} ${lengthMm(s)} mm, r0 ${mm2(s.r0)} mm`,
  outline: (s) => [{ shape: 'rod-set', reachR0: 1.5, rods: num(storedStage(s).poles) ?? 4 }],
  electrodeLabels(s) {
    // Rods alternately at ±(U + V cos Ωt): the rod on +x and every second one from it carry +.
    const r0 = num(s.r0) ?? 0, len = num(s.length) ?? 0, poles = num(s.poles) ?? 4;
    const v = dcPlusRf(num(s.dc) ?? 0, rfAmplitude(s));
    const wrap = v.includes(' + ') ? `(${v})` : v;
    // Rods at θ_k = kπ/n, where cos(nθ) = (−1)^k.
    const az = (odd: number) => Array.from({ length: poles / 2 }, (_, i) => ((2 * i + odd) * Math.PI) / (poles / 2));
    return [
      { text: `rods even +${wrap}`, at: [{ r: 1.6 * r0, z: 0.62 * len, azimuths: az(0) }] },
      { text: `rods odd −${wrap}`, at: [{ r: 1.6 * r0, z: 0.38 * len, azimuths: az(1) }] },
    ];
  },
  plausibility: (st) => r0Plausibility(st.r0, 'RF multipole guides'),
  assumptions: ['Multipole guides: the ideal field (r/r0)^n cos(nθ) of 2n rods, no fringe fields at the ends and no higher harmonics of round rods.'],
};
