// Stage kind `electrodes`: a field that comes from the electrodes a designer can machine, solved
// on a grid (sim/fields) by `iontrail field` or before a run, and tracked through by kernel.ts in the
// superposition of its unit solutions (solution.ts, field.ts).

import { electrodeSolids } from './solids.js';
import { trackElectrodesAdaptive } from './adaptive.js';
import { LENGTH_FIELD, RF_FIELD, resolveRf } from '../../scene/fields.js';
import type { StageKind } from '../kind.js';
import { dcPlusRf, lengthMm, mm2, num, rfAmplitude } from '../shared/describe.js';
import { ELECTRODE_FIELD, GRID_FIELD } from './schema.js';
import { resolveProblem } from './resolve.js';
import { labelAnchor } from './labels.js';
import type { ElectrodesStage } from './stage.js';
import { electrodesField } from './field.js';
import { trackElectrodes } from './kernel.js';
import { electrodesCoupling } from './coupling.js';
import { registerSolution, SERIES_ORDERS, solutionKeys } from './solution.js';
import { electrodesScan } from './scan.js';

type Raw = Readonly<Record<string, unknown>>;
const problemOf = (s: Raw | undefined) => (s?.problem ?? {}) as { grid?: Raw; electrodes?: readonly Raw[] };

export const electrodesKind: StageKind<ElectrodesStage> = {
  type: 'electrodes',
  entries: {
    electrodes: {
      fields: {
        length: LENGTH_FIELD, grid: GRID_FIELD, rf: RF_FIELD, electrodes: { kind: 'list', item: ELECTRODE_FIELD, minItems: 1 },
        field_path: { kind: 'enum', values: ['grid', 'multipole'] },
        aux: {
          kind: 'object',
          fields: { amplitude: { kind: 'quantity', dim: 'voltage', nonNegative: true }, frequency: { kind: 'quantity', dim: 'frequency', positive: true }, phase: { kind: 'quantity', dim: 'angle' } },
          required: ['amplitude', 'frequency'],
        },
      },
      required: ['length', 'grid', 'electrodes'],
      resolve(s, at) {
        const fail = (key: (string | number)[], msg: string): never => at.fail(key, msg);
        const problem = resolveProblem(s, fail);
        const st: ElectrodesStage = { type: 'electrodes', length: s.length, problem, zStart: at.z, zEnd: at.z + s.length };
        if (s.rf) st.rf = resolveRf(s.rf);
        if (s.field_path === 'multipole') {
          if (problem.grid.symmetry !== 'planar') fail(['field_path'], `multipole evaluates a rod set of constant cross-section in its fitted series: it needs a planar grid, not symmetry ${problem.grid.symmetry} (use field_path: grid)`);
          st.path = 'multipole';
        }
        if (s.aux) st.aux = { amplitude: s.aux.amplitude, frequency: s.aux.frequency, phase: s.aux.phase ?? 0 };
        problem.electrodes.forEach((e, i) => {
          if (e.potential.rf !== 0 && !st.rf) fail(['electrodes', i, 'potential', 'rf'], 'drives this electrode with the stage RF, but the stage has no rf block (rf: { amplitude: 830 V, frequency: 1.2 MHz })');
          if (e.potential.aux !== 0 && !st.aux) fail(['electrodes', i, 'potential', 'aux'], 'drives this electrode with the supplementary AC, but the stage has no aux block (aux: { amplitude: 2 V, frequency: 330 kHz })');
        });
        return [st];
      },
    },
  },
  holdsIons: false,
  hasRf: true,
  rf: (st) => st.rf,
  field: electrodesField,
  coupling: electrodesCoupling,
  track: (st, c, ctx, run) => (run.integrator === 'dopri5'
    ? trackElectrodesAdaptive(st, c, ctx, run.tolerance)
    : trackElectrodes(st, c, ctx, run.stepsPerCycle, run.stepNoRf)),
  fieldProblem: (st) => st.problem,
  useSolution(st, sol) {
    const path = st.path ?? 'grid';
    registerSolution(st.problem, sol, path);
    const nodes = sol.grid.shape[0] * sol.grid.shape[1] * sol.grid.shape[2], key = solutionKeys(st.problem).geometry;
    st.field_path = path === 'multipole'
      ? { path: 'multipole series', cache_key: key, nodes, orders: SERIES_ORDERS, reference_radius_m: st.problem.grid.referenceRadius }
      : { path: 'interpolated grid', cache_key: key, nodes };
  },
  exitFate: () => undefined,
  exitAperture: () => undefined,
  // A solved trap scans along z, its a_z and q_z from the field at its centre (scan.ts).
  massScan: electrodesScan,
  uniformField: false,
  gasPieces: false,
  describe(s) {
    const p = problemOf(s);
    const g = p.grid ?? {};
    const n = p.electrodes?.length ?? 0;
    return `electrodes ${lengthMm(s)} mm, ${String(g.symmetry === 'none' ? '3D' : g.symmetry)} grid ${mm2(g.spacing)} mm, ${n} electrode${n === 1 ? '' : 's'}`;
  },
  // The 3D view draws the electrodes' own shapes (solids.ts), read from the stage as stored (the
  // renderer's placed stage carries it as `stored`).
  outline: (s) => [{ shape: 'solids', solids: electrodeSolids(((s.stored ?? s) as Readonly<Record<string, unknown>>)) }],
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
  assumptions: [
    'Electrode fields are solved on a finite-difference grid (Laplace equation), with the box edge grounded unless an electrode covers it.',
    'Ions are tracked in the superposition of the unit solutions, interpolated between grid nodes by cubic Hermite polynomials with an exact gradient (or, for field_path: multipole, in the fitted multipole series); values inside electrodes near their surface are continued from outside.',
    'Ions are lost where they enter an electrode shape or reach the grid\'s box edge; with space charge the field is interpolated once per coupled step and the same shapes are the loss test.',
  ],
};
