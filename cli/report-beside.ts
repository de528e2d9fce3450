// `iontrail report SCENE --beside OTHER --vary mz=A..B:N`: the m/z sweep of the report's scene and
// of a second scene over the same points (with the same --set and --seed), the multipole table of
// every planar electrodes stage of either scene, and the figures that go with them: both peaks on
// one axis and the equipotentials of each electrodes stage.

import { cacheKey, cacheRoot, readCached } from '../sim/fields/cache.js';
import { DEFAULT_TOLERANCE } from '../sim/fields/solve.js';
import { fitMultipoles } from '../sim/fields/multipoles.js';
import { fieldMap } from '../sim/fields/slice.js';
import { voltsAt } from '../sim/fields/folder.js';
import { loadSceneFile } from '../sim/scene/load.js';
import type { Scene } from '../sim/scene/types.js';
import { fieldProblemOf, kindOf, rfOf } from '../sim/stages/registry.js';
import { isQuadrupole } from '../sim/stages/guards.js';
import { planSweep, reduceSweep, runPointRange, SweepError } from '../sim/sweeps/sweep.js';
import { relativeTerms, type BesideMultipoles, type BesideResult, type BesideSweep } from '../sim/report/beside.js';
import { TOOL_VERSION } from '../sim/version.js';
import { equipotentialSpec, renderSpec } from '../render/fields/figures.js';
import { renderFigure } from '../render/plot/index.js';
import { peaksBesideFigure } from '../render/report/figures/peaks-beside.js';
import type { ReportFigure } from '../render/report/figures.js';
import { prepareTracking } from './tracking.js';
import { UsageError } from './errors.js';

/** Orders of the multipole fit (as `iontrail field`). */
const MULTIPOLE_ORDERS = 20;

export interface BesideRequest {
  scene: { file: string; text: string };
  other: string;
  vary: string;
  set: string[];
  seed?: number;
  workers?: number;
  noSolve: boolean;
}

async function sweepOf(file: string, text: string, r: BesideRequest) {
  const plan = planSweep({ sceneText: text, sceneFile: file, set: r.set, seed: r.seed, vary: [r.vary], method: 'auto', workers: r.workers });
  if (plan.axes.length !== 1 || plan.axes[0].key !== 'mz') throw new UsageError(`--vary with --beside varies m/z only (e.g. mz=496..508:41), got '${r.vary}'`);
  await prepareTracking(file, plan.base, { noSolve: r.noSolve, workers: r.workers });
  return reduceSweep(plan, await runPointRange(plan, 0, plan.tasks.length));
}

/** Multipoles of each planar electrodes stage of `scenes[k]`, with A₂ against a quadrupole stage of the other scene. */
function multipolesOf(scenes: Scene[]): BesideMultipoles[] {
  const out: BesideMultipoles[] = [];
  scenes.forEach((scene, k) => {
    scene.stages.forEach((st, i) => {
      const p = fieldProblemOf(st);
      if (!p || p.grid.symmetry !== 'planar' || p.grid.referenceRadius === undefined) return;
      const sol = readCached(cacheRoot(), cacheKey(p, DEFAULT_TOLERANCE));
      if (!sol) return;
      const terms = fitMultipoles(sol, p, { nMax: MULTIPOLE_ORDERS, referenceRadius: p.grid.referenceRadius });
      const c2 = terms.find((t) => t.n === 2)?.cos_v ?? 0;
      const otherScene = scenes.length === 2 ? 1 - k : -1;
      const qi = otherScene < 0 ? -1 : scenes[otherScene].stages.findIndex(isQuadrupole);
      let a2: BesideMultipoles['a2'] = null;
      if (qi >= 0) {
        const q = scenes[otherScene].stages[qi];
        if (isQuadrupole(q) && q.dc !== 0) {
          const rr = p.grid.referenceRadius;
          a2 = { value: c2 / (q.dc * (rr / q.r0) ** 2), r0_m: q.r0, dc_v: q.dc, against_scene: otherScene, against_stage: q.sceneIndex ?? qi };
        }
      }
      out.push({ scene: k, stage: st.sceneIndex ?? i, reference_radius_m: p.grid.referenceRadius, terms: relativeTerms(terms), a2 });
    });
  });
  return out;
}

/** Equipotentials of every solved electrodes stage of the scenes (at t = 0), as report figures. */
async function equipotentialFigures(scenes: { scene: Scene; file: string }[]): Promise<ReportFigure[]> {
  const figs: ReportFigure[] = [];
  for (const [k, { scene, file }] of scenes.entries()) {
    for (const [i, st] of scene.stages.entries()) {
      const p = fieldProblemOf(st);
      if (!p) continue;
      const sol = readCached(cacheRoot(), cacheKey(p, DEFAULT_TOLERANCE));
      if (!sol) continue;
      const stored = st as unknown as Record<string, unknown>;
      const index = st.sceneIndex ?? i;
      const map = fieldMap(sol, voltsAt(p, rfOf(st), 0), sol.grid.symmetry === 'none' ? 1 : 2, 0, p);
      const footer = `iontrail ${TOOL_VERSION}  ·  scene ${file}  ·  stage ${index}  ·  grid ${(sol.grid.spacing * 1e3).toPrecision(3)} mm`;
      const spec = equipotentialSpec(map, {
        title: `${scene.name} — equipotentials of stage ${index}`, subtitle: `${kindOf(st).describe(stored)}; electrodes at t = 0 (dc + RF at its phase)`,
        footer, electrodes: kindOf(st).electrodeLabels(stored).map((l) => l.text),
      }).spec;
      const id = `equipotential-${k}-${index}`;
      figs.push({ id, file: `fig-${id}.png`, title: `Equipotentials: ${scene.name}, stage ${index}`, caption: `Potential of the solved electrodes stage ${index} of ${file} at t = 0 (dc + RF at its phase), from the field solve the ions were tracked through.`, png: await renderSpec(spec, 'png'), width: 1000, height: 820 });
    }
  }
  return figs;
}

export async function besideReport(r: BesideRequest): Promise<{ result: BesideResult; figures: ReportFigure[]; warnings: string[]; other: Scene }> {
  const { scene: otherScene, text: otherText } = loadSceneFile(r.other, { set: r.set, seed: r.seed });
  await prepareTracking(r.other, otherScene, { noSolve: r.noSolve, workers: r.workers });
  let sweeps;
  try {
    sweeps = [await sweepOf(r.scene.file, r.scene.text, r), await sweepOf(r.other, otherText, r)];
  } catch (e) {
    if (e instanceof SweepError) throw new UsageError(`--beside: ${e.message}`);
    throw e;
  }
  const mz = sweeps[0].points.map((p) => p.values[0]);
  const rows: BesideSweep[] = sweeps.map((w, k) => ({
    scene_name: w.scene.name, scene_file: k === 0 ? r.scene.file : r.other, method: w.method.used,
    peak: w.peak ? { mz: w.peak.mz, fwhm_mz: w.peak.fwhm_mz, resolution_50: w.peak.resolution_50, resolution_10: w.peak.resolution_10, transmission: w.peak.transmission } : null,
    transmission: w.points.map((p) => p.transmission),
  }));
  const scenes = sweeps.map((w) => w.scene);
  const result: BesideResult = { varied: r.vary, ions_per_point: sweeps[0].ionsPerPoint, mz, sweeps: rows, multipoles: multipolesOf(scenes) };
  const figures: ReportFigure[] = [];
  const spec = peaksBesideFigure(rows.map((w) => ({ name: w.scene_name, mz, transmission: w.transmission, peak: w.peak })), result.ions_per_point,
    `iontrail ${TOOL_VERSION}  ·  seed ${sweeps[0].seed}  ·  scenes ${r.scene.file}, ${r.other}`);
  if (spec) {
    const W = 1100, H = 700;
    figures.push({ id: 'peaks-beside', file: 'fig-peaks-beside.png', title: 'Peak beside the other filter', caption: `Transmission against m/z of ${rows[0].scene_name} and ${rows[1].scene_name}, swept over the same ${mz.length} m/z points (${r.vary}); dashed lines at the peak centres.`, png: await renderFigure(spec, { width: W, height: H, format: 'png' }), width: W, height: H });
  }
  figures.push(...await equipotentialFigures([{ scene: scenes[0], file: r.scene.file }, { scene: scenes[1], file: r.other }]));
  return { result, figures, warnings: [...new Set([...sweeps[0].warnings, ...sweeps[1].warnings])], other: scenes[1] };
}
