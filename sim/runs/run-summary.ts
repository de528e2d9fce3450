// summary.json of a run from its reducers: shared by a run (run-scene.ts) and by the merge of a
// run's shards (merge-run.ts), which feeds the same reducers the same rows in the same order, so
// both write the same figures.

import type { Scene } from '../scene/types.js';
import type { RunSummary, SpeciesSummary } from '../runfolder/summary.js';
import { TOOL_VERSION } from '../version.js';
import { finiteOrNull } from '../core/json.js';
import { EnsembleHistory } from '../engine/history.js';
import { isElectrostatic } from '../engine/potential.js';
import { detectorOf } from '../scene/detector.js';
import { ArrivalTally, figureBlocks, needsArrivals, SpeciesTally, StepTally, type BatchReducer } from './reducers.js';
import type { RunEstimate } from './estimate.js';

export interface RunTallies {
  hist: EnsembleHistory;
  tally: SpeciesTally;
  stepTally: StepTally;
  arrivals: ArrivalTally | null;
  /** Fed every batch result in batch order. */
  reducers: BatchReducer[];
}

export function runTallies(scene: Scene): RunTallies {
  const hist = new EnsembleHistory(scene.run.historyEvery, scene.run.maxTime, scene.ions.length);
  const tally = new SpeciesTally(scene);
  const stepTally = new StepTally();
  const arrivals = needsArrivals(scene) ? new ArrivalTally(scene) : null;
  return { hist, tally, stepTally, arrivals, reducers: arrivals ? [tally, stepTally, arrivals] : [tally, stepTally] };
}

export interface SummaryContext {
  /** Ions finished and ions asked for. */
  done: number;
  total: number;
  stoppedBy: string;
  /** Scene warnings found before the run; the run's own are added after them. */
  warnings: string[];
  workers: number;
  started: Date;
  wallS: number;
  estimate: RunEstimate;
  batchSize: number;
  sceneFile: string | null;
  commandLine: string;
  spaceCharge?: Record<string, unknown>;
  /** A coupled run stopped early: the run time it reached, s. */
  stoppedAt?: number;
  /** A coupled run's step, its count and what it was chosen from. */
  coupledStep?: { h: number; steps: number; from: string };
}

/** The summary and the history tables (written by the caller). */
export function runSummary(scene: Scene, t: RunTallies, c: SummaryContext) {
  const warnings = c.warnings;
  const complete = c.done === c.total && c.stoppedAt === undefined;
  if (c.stoppedAt !== undefined) {
    warnings.push(`interrupted (${c.stoppedBy}): the coupled run stopped at t = ${Number((c.stoppedAt * 1e6).toPrecision(4))} µs of max_time ${Number((scene.run.maxTime * 1e6).toPrecision(4))} µs; ions still in flight are kept as alive at that time`);
  } else if (!complete) warnings.push(`interrupted (${c.stoppedBy}): ${c.done} of ${c.total} ions finished; the tables hold those only`);
  const { steps, energyError } = t.stepTally;
  if (isElectrostatic(scene) && energyError > 1e-6) {
    warnings.push(`energy drift ${energyError.toExponential(2)} (relative) in an electrostatic-only scene exceeds 1e-6`);
  }
  const histCols = t.hist.table();
  const speciesCols = t.hist.speciesTable();
  const species: SpeciesSummary[] = t.tally.species();
  const totals = species.reduce((a, s) => ({
    total: a.total + s.total, detected: a.detected + s.detected, hit: a.hit + s.hit,
    missed: a.missed + (s.missed ?? 0), returned: a.returned + (s.returned ?? 0), alive: a.alive + s.alive,
  }), { total: 0, detected: 0, hit: 0, missed: 0, returned: 0, alive: 0 });
  const det = detectorOf(scene);
  const summary: RunSummary = {
    complete,
    scene_name: scene.name,
    ions: totals,
    detector: { radius_m: Number.isFinite(det.radius) ? det.radius : null, source: det.source },
    species,
    stats: { steps, wall_s: c.wallS, ion_steps_per_s: steps / Math.max(1e-9, c.wallS), max_energy_error: energyError },
    warnings,
    provenance: {
      tool_version: TOOL_VERSION,
      scene: sceneForJson(scene),
      scene_file: c.sceneFile,
      seed: scene.seed,
      command_line: c.commandLine,
      // Only the settings that apply: a tolerance exists for the adaptive method alone.
      integrator: c.coupledStep
        ? { method: 'verlet (coupled ensemble)', step_s: c.coupledStep.h, steps: c.coupledStep.steps, step_chosen_from: c.coupledStep.from, steps_per_cycle: scene.run.stepsPerCycle, max_time_s: scene.run.maxTime, record_every: scene.run.recordEvery }
        : { method: scene.run.integrator, ...(scene.run.integrator === 'dopri5' ? { tolerance: scene.run.tolerance } : {}), steps_per_cycle: scene.run.stepsPerCycle, step_without_rf_s: scene.run.stepNoRf, max_time_s: scene.run.maxTime, record_every: scene.run.recordEvery },
      workers: c.workers,
      started_at: c.started.toISOString(),
      batch_size: c.batchSize,
      estimate: c.estimate,
    },
    units: { length: 'm', time: 's', velocity: 'm/s', energy: 'eV', voltage: 'V', frequency: 'Hz', pressure: 'Pa', mass: 'kg' },
  };
  const blocks = figureBlocks(scene, histCols, t.tally, t.arrivals, totals.total, warnings, speciesCols);
  if (blocks.cooling) summary.cooling = blocks.cooling;
  if (c.spaceCharge) summary.space_charge = c.spaceCharge;
  if (blocks.tof) summary.tof = blocks.tof;
  if (blocks.scan) summary.scan = blocks.scan;
  return { summary, histCols, speciesCols };
}

/** The resolved scene as JSON-safe data (Infinity → null). */
export function sceneForJson(scene: Scene): unknown {
  return JSON.parse(JSON.stringify(scene, finiteOrNull));
}
