// Stage kind `electrodes`: a field that comes from the electrodes a designer can machine, solved
// on a grid by `iontrail field` (sim/fields). Tracking ions through it comes later; until then
// `run`, `sweep` and `report` refuse such a scene (trackingUnavailable) while figures still draw it.

import { LENGTH_FIELD, RF_FIELD, resolveRf } from '../../scene/fields.js';
import type { FieldModel } from '../../core/field-model.js';
import type { StageKind } from '../kind.js';
import { dcPlusRf, lengthMm, mm2, num, rfAmplitude } from '../shared/describe.js';
import { ELECTRODE_FIELD, GRID_FIELD } from './schema.js';
import { resolveProblem } from './resolve.js';
import { labelAnchor } from './labels.js';
import type { ElectrodesStage } from './stage.js';

const NOT_YET = 'the field of an electrodes stage can be solved and mapped with `iontrail field`; tracking ions through it is not available yet';

function notYet(): never {
  throw new Error(NOT_YET);
}

type Raw = Readonly<Record<string, unknown>>;
const problemOf = (s: Raw | undefined) => (s?.problem ?? {}) as { grid?: Raw; electrodes?: readonly Raw[] };

export const electrodesKind: StageKind<ElectrodesStage> = {
  type: 'electrodes',
  entries: {
    electrodes: {
      fields: { length: LENGTH_FIELD, grid: GRID_FIELD, rf: RF_FIELD, electrodes: { kind: 'list', item: ELECTRODE_FIELD, minItems: 1 } },
      required: ['length', 'grid', 'electrodes'],
      resolve(s, at) {
        const fail = (key: (string | number)[], msg: string): never => at.fail(key, msg);
        const problem = resolveProblem(s, fail);
        const st: ElectrodesStage = { type: 'electrodes', length: s.length, problem, zStart: at.z, zEnd: at.z + s.length };
        if (s.rf) st.rf = resolveRf(s.rf);
        problem.electrodes.forEach((e, i) => {
          if (e.potential.rf !== 0 && !st.rf) fail(['electrodes', i, 'potential', 'rf'], 'drives this electrode with the stage RF, but the stage has no rf block (rf: { amplitude: 830 V, frequency: 1.2 MHz })');
        });
        return [st];
      },
    },
  },
  holdsIons: false,
  hasRf: true,
  rf: (st) => st.rf,
  field: (): FieldModel => notYet(),
  track: () => notYet(),
  trackingUnavailable: NOT_YET,
  fieldProblem: (st) => st.problem,
  exitFate: () => undefined,
  exitAperture: () => undefined,
  uniformField: false,
  gasPieces: false,
  describe(s) {
    const p = problemOf(s);
    const g = p.grid ?? {};
    const n = p.electrodes?.length ?? 0;
    return `electrodes ${lengthMm(s)} mm, ${String(g.symmetry === 'none' ? '3D' : g.symmetry)} grid ${mm2(g.spacing)} mm, ${n} electrode${n === 1 ? '' : 's'}`;
  },
  // The 3D view has no builder for arbitrary shapes yet: a tube marks the stage's extent.
  outline: () => [{ shape: 'tube' }],
  electrodeLabels(s) {
    const p = problemOf(s);
    const sym = String(p.grid?.symmetry ?? 'planar');
    const amp = rfAmplitude(s);
    return (p.electrodes ?? []).map((e) => {
      const pot = (e.potential ?? {}) as Raw;
      const text = `${String(e.name)} ${dcPlusRf(num(pot.dc) ?? 0, (num(pot.rf) ?? 0) * amp)}`;
      const len = num(s.length) ?? (num(s.zEnd) ?? 0) - (num(s.zStart) ?? 0);
      return { text, at: [labelAnchor(sym, ((e.shapes ?? []) as Raw[])[0] ?? {}, len)] };
    });
  },
  plausibility: () => [],
  assumptions: ['Electrode fields are solved on a finite-difference grid (Laplace equation), with the box edge grounded unless an electrode covers it.'],
};
