// Before ions are tracked through stages whose field is solved from electrodes: each stage's unit
// solutions from the field cache (sim/fields/cache.ts), solved now when missing (or refused under
// --no-solve), handed to the kernels of this thread; worker threads read the same cache entry.
// Then the boundary rule: where a solved stage meets another stage the DC potentials on the axis
// must agree, else an ion would jump in potential there; refused with both values.

import { freemem } from 'node:os';
import type { Scene } from '../scene/types.js';
import { SceneError } from '../scene/schema.js';
import { cacheKey, cacheRoot, readCached, writeCached } from '../fields/cache.js';
import { checkProblem } from '../fields/check.js';
import { DEFAULT_TOLERANCE, solveField } from '../fields/solve.js';
import { FieldInputError, type FieldSolution } from '../fields/problem.js';
import { fieldProblemOf, kindOf, useSolution } from '../stages/registry.js';
import { stageFields } from './potential.js';
import { allocateBatch } from '../core/batch.js';
import { ELECTRONVOLT, ELEMENTARY_CHARGE, ionMassKg } from '../units/constants.js';
import { populationOffsets, stageAt, startIon } from './start.js';

/** Warnings found while preparing a scene's solved fields (sceneWarnings adds them). */
const prepared = new WeakMap<Scene, string[]>();

/** The warnings prepareSolvedFields found for this scene object. */
export function solvedFieldWarnings(scene: Scene): string[] {
  return prepared.get(scene) ?? [];
}

export interface SolvedFieldOptions {
  /** Refuse a stage whose solution is not in the cache instead of solving it. */
  noSolve?: boolean;
  workers?: number;
  /** Told of each stage about to be solved (the CLI prints it to stderr). */
  onSolve?: (stage: number, cached: boolean) => void;
}

/** Largest disagreement of the axis potentials at a boundary, V: round-off of the solve (1e-10 relative) and the interpolation. */
function boundaryTolerance(scale: number): number {
  return Math.max(1e-3, 1e-4 * scale);
}

export async function prepareSolvedFields(scene: Scene, file: string, opts: SolvedFieldOptions = {}): Promise<void> {
  const root = cacheRoot();
  let any = false;
  for (let i = 0; i < scene.stages.length; i++) {
    const st = scene.stages[i];
    const problem = fieldProblemOf(st);
    if (problem === undefined) continue;
    any = true;
    const at = `${file}: stages.${st.sceneIndex ?? i}`;
    const key = cacheKey(problem, DEFAULT_TOLERANCE);
    let sol: FieldSolution | undefined = readCached(root, key);
    if (sol === undefined) {
      if (opts.noSolve) throw new SceneError(`${at}: the electrode field of this stage is not solved (no entry ${key.slice(0, 12)} in the field cache ${root}); run once without --no-solve (it solves and caches the field); iontrail field SCENE --at X,Y,Z fills the same cache (field -o DIR keeps its own beside DIR)`);
      opts.onSolve?.(st.sceneIndex ?? i, false);
      try {
        checkProblem(problem, { freeMemoryBytes: freemem() });
        sol = await solveField(problem, { workers: opts.workers, tolerance: DEFAULT_TOLERANCE });
      } catch (e) {
        if (e instanceof FieldInputError) throw new SceneError(`${at}.${e.key}: ${e.message}`);
        throw e;
      }
      if (!writeCached(root, key, sol)) throw new SceneError(`${at}: the solved field could not be stored in the field cache ${root} (the worker threads read it there); check that it is writable or set XDG_CACHE_HOME`);
    }
    useSolution(st, sol);
  }
  if (!any) return;
  checkBoundaries(scene, file);
  prepared.set(scene, [...startsInside(scene), ...coarseSteps(scene)]);
}

/**
 * Ions whose start lies inside an electrode of a solved stage: they are counted lost (hit at
 * t = 0, the kernel's first test); one warning per stage with the count. The starts are drawn by
 * the engine's own start (the same counter-based streams), so the count is the run's.
 */
function startsInside(scene: Scene): string[] {
  const fields = stageFields(scene);
  const solved = scene.stages.map((st) => fieldProblemOf(st) !== undefined);
  const offsets = populationOffsets(scene);
  const total = offsets[offsets.length - 1];
  const counts = new Map<number, number>();
  const b = allocateBatch(1);
  let pop = 0;
  for (let ion = 0; ion < total; ion++) {
    while (ion >= offsets[pop + 1]) pop++;
    startIon(scene, b, 0, ion, pop, scene.ions[pop]);
    const s = stageAt(scene, b.z[0]);
    if (s < 0 || !solved[s]) continue;
    const f = fields[s];
    if (f.outside(b.x[0], b.y[0], b.z[0] - f.zRef)) counts.set(s, (counts.get(s) ?? 0) + 1);
  }
  return [...counts].map(([s, n]) => `stages.${scene.stages[s].sceneIndex ?? s}: ${n} of ${total} ions start inside an electrode or beyond the grid of this stage; they are counted as hit at t = 0`);
}

/**
 * A fixed step that carries an ion across more than one grid cell: the fastest ion the scene can
 * make (its start energy, mean + 3 spreads, plus what it gains falling along the stage's axis in
 * the dc field, sampled at 200 points; bounded RF motion adds little for a stable ion) against the
 * spacing. The interpolated field then changes more within a step than RK4 follows. The multipole
 * path reads no grid, so it is not checked; nor is integrator: dopri5, which takes neither step:
 * its error control sizes the steps, and a step longer than a cell is looked along for electrodes
 * (sim/stages/electrodes/adaptive.ts).
 */
function coarseSteps(scene: Scene): string[] {
  const w: string[] = [];
  if (scene.run.integrator === 'dopri5') return w;
  const fields = stageFields(scene);
  scene.stages.forEach((st, i) => {
    const p = fieldProblemOf(st);
    if (p === undefined || (st as { path?: string }).path === 'multipole') return;
    const rf = kindOf(st).rf(st);
    const h = rf ? 1 / rf.frequency / scene.run.stepsPerCycle : scene.run.stepNoRf;
    let lo = Infinity, hi = -Infinity;
    for (let k = 0; k <= 200; k++) {
      const v = fields[i].dcPotential(0, 0, (k / 200) * (st.zEnd - st.zStart));
      if (Number.isFinite(v)) { lo = Math.min(lo, v); hi = Math.max(hi, v); }
    }
    const gain = hi > lo ? hi - lo : 0;
    let fastest = 0;
    for (const pop of scene.ions) {
      const ke = (pop.energy + 3 * pop.energySpread) * ELECTRONVOLT + Math.abs(pop.charge) * ELEMENTARY_CHARGE * gain;
      fastest = Math.max(fastest, Math.sqrt((2 * ke) / ionMassKg(pop.mz, pop.charge)));
    }
    const cells = (fastest * h) / p.grid.spacing;
    if (cells > 1) w.push(`stages.${st.sceneIndex ?? i}: the step (${Number((h * 1e9).toPrecision(3))} ns) may carry the fastest ion (${Number((fastest / 1e3).toPrecision(3))} km/s) across ${Number(cells.toPrecision(3))} grid cells of ${Number((p.grid.spacing * 1e3).toPrecision(3))} mm; the interpolated field changes within a step: use a smaller run.step_without_rf or more run.steps_per_cycle`);
  });
  return w;
}

/** The DC potential on the axis at each boundary of a solved stage against its neighbour's. */
function checkBoundaries(scene: Scene, file: string): void {
  const fields = stageFields(scene);
  // Absolute axis potential at each stage's entrance: ideal stages carry drops only, so the chain
  // starts at the first stage (a solved first stage sets it from its own electrodes).
  const solved = scene.stages.map((st) => fieldProblemOf(st) !== undefined);
  // A solved stage's potential is absolute (grounded box): its dc terms on the axis at the entrance.
  const entrance = (i: number) => fields[i].terms.reduce((p, t) => p + (t.name === 'dc' ? t.drive(0) * t.unitPotential(0, 0, 0) : 0), 0);
  let phi = solved[0] ? entrance(0) : 0;
  for (let i = 0; i < scene.stages.length; i++) {
    const st = scene.stages[i];
    if (solved[i]) {
      const here = entrance(i);
      const scale = Math.max(...(fieldProblemOf(st)?.electrodes.map((e) => Math.abs(e.potential.dc)) ?? [0]), Math.abs(phi));
      if (i > 0 && Math.abs(here - phi) > boundaryTolerance(scale)) {
        const prev = scene.stages[i - 1];
        throw new SceneError(`${file}: stages.${st.sceneIndex ?? i}: the potential on the axis at this stage's entrance (z = ${(st.zStart * 1e3).toPrecision(5)} mm) is ${here.toPrecision(6)} V from its electrodes but ${phi.toPrecision(6)} V where the stage before it (${kindOf(prev).describe(prev as unknown as Record<string, unknown>)}) ends: an ion would jump in potential; make the two agree (electrode dc volts, or an accelerate stage between)`);
      }
      phi = here;
    }
    phi += fields[i].drop;
  }
}
