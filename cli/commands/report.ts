// iontrail report SCENE -o DIR [--seed N] [--workers N] [--set k=v]... [--force]: run what the scene
// needs and write a design-review bundle — report.html (self-contained), report.md with the
// fig-*.png beside it, results.json, the run folder under run/ (and a small trajectory sample when
// the scene records none). The bundle is built in a temporary folder next to DIR and renamed into
// place, so DIR appears whole or not at all.

import { firstRf } from '../../sim/stages/registry.js';
import { isQuadrupole } from '../../sim/stages/guards.js';
import { existsSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { parseVary, SweepError } from '../../sim/sweeps/vary.js';
import { dirname, join, resolve } from 'node:path';
import { folderBeside, swapFolderIntoPlace } from '../../sim/core/atomic.js';
import { parseArgs, flag, type FlagSpec } from '../args.js';
import { UsageError } from '../errors.js';
import { progressBar } from '../progress.js';
import { interruptedExitCode, maxOutputHelp, maxOutput, printEstimate } from '../run-limits.js';
import { onStopSignal } from '../../sim/runs/stop-signals.js';
import type { RunEstimate } from '../../sim/runs/estimate.js';
import { parseCount } from './run.js';
import { loadSceneFile } from '../../sim/scene/load.js';
import { noSolveHelp, prepareTracking } from '../tracking.js';
import type { Scene } from '../../sim/scene/types.js';
import { runScene } from '../../sim/runs/run-scene.js';
import { mzWindow } from '../../sim/mathieu/operating-point.js';
import { sceneTraits } from '../../sim/report/scene-kind.js';
import { reportInputRows } from '../../sim/report/inputs.js';
import { buildResults, formatResults, type ReportResults, type SweepResult } from '../../sim/report/results.js';
import { makeFigures } from '../../render/report/figures.js';
import type { SweepCurve } from '../../render/report/figures/peak.js';
import { reportDocument } from '../../render/report/document.js';
import { reportHtml } from '../../render/report/html.js';
import { reportMarkdown } from '../../render/report/markdown.js';
import { besideReport } from '../report-beside.js';
import { assumptions } from '../../sim/report/assumptions.js';

export const describe = 'run a scene and write a design-review bundle (report.html, report.md, figures, results.json, run folder)';

const USAGE = 'usage: iontrail report SCENE.yaml -o DIR [--beside OTHER.yaml --vary mz=A..B:N] [--seed N] [--workers N] [--set key=value]... [--max-output SIZE] [--no-solve] [--force]';

const HELP = `${USAGE}

Runs the scene (and, for a quadrupole filter, an m/z sweep over its Mathieu window) and writes DIR:
  report.html      self-contained page: tables, figures inline, no external files or addresses
  report.md        the same as Markdown, with the fig-*.png beside it
  results.json     every number of the report (SI units, energies in eV)
  run/             the run folder (summary.json, ions.arrow, history.arrow, trajectories.arrow)
  trajectory-sample/  a few recorded ions per species when the scene records no trajectories

  -o, --out DIR      bundle folder; its parent must exist
  --beside OTHER     also sweep OTHER.yaml (e.g. the hyperbolic filter beside a round-rod one) over the
                     same m/z points: both peaks in one table and one figure, the multipole table and the
                     equipotential figure of every electrodes stage of either scene
  --vary mz=A..B:N   the m/z points of --beside (N evenly spaced values from A to B); --set and --seed
                     apply to both scenes
  --seed N           replace the scene's seed
  --workers N        worker threads (default: all cores)
  --set key=value    override a scene value, e.g. --set stages.0.dc=42V (repeatable)
${maxOutputHelp()}
${noSolveHelp()}  --force            replace an existing DIR (the old one is removed only once the new one is complete)
  -h, --help         this text

Ctrl-C or SIGTERM stops the report: nothing is written, exit code 130 (SIGINT) or 143 (SIGTERM).
`;

/** Folder names inside a bundle. */
export const RUN_FOLDER = 'run';
export const SAMPLE_FOLDER = 'trajectory-sample';
/** Ions per species in the trajectory sample, and the points per ion it aims at. */
const SAMPLE_IONS = 3;
const SAMPLE_POINTS = 1500;

export interface BundleOptions {
  out: string;
  force?: boolean;
  workers?: number;
  sceneFile: string | null;
  commandLine: string;
  /** Progress line label; no progress line when undefined. */
  progressLabel?: string;
  handleSigint?: boolean;
  /** Output limit of the scene's run, bytes (runScene's default when absent). */
  maxOutput?: number;
  /** Told the estimate of the scene's run before it starts. */
  onEstimate?: (e: RunEstimate, workers: number) => void;
  /** Scene file text, --set overrides and --seed, for the m/z sweep of a filter (it re-reads the scene per point). */
  sceneText?: string;
  set?: string[];
  seed?: number;
  /** --beside OTHER --vary mz=...: sweep both scenes over the same points (cli/report-beside.ts). */
  beside?: { other: string; vary: string; noSolve: boolean };
}

export interface BundleResult {
  dir: string;
  results: ReportResults;
  /** False when the run was interrupted (nothing is written then). */
  complete: boolean;
}

class Interrupted extends Error {}

/** Refuse an existing DIR (without force) or a missing parent folder before any work. */
export function checkBundleTarget(out: string, force: boolean): void {
  const dir = resolve(out);
  const parent = dirname(dir);
  if (!existsSync(parent)) throw new UsageError(`report: -o ${out}: parent folder ${parent} does not exist`);
  if (!statSync(parent).isDirectory()) throw new UsageError(`report: -o ${out}: ${parent} is a file, not a folder`);
  if (existsSync(dir) && !force) throw new UsageError(`report: -o ${out} already exists (give --force to replace it)`);
  if (existsSync(dir) && !statSync(dir).isDirectory()) throw new UsageError(`report: -o ${out} exists and is not a folder`);
}

/**
 * The scene of the trajectory sample: the first few ions of each population from the same start
 * distributions, with trajectories recorded at about SAMPLE_POINTS points per ion.
 */
export function sampleScene(scene: Scene): { scene: Scene; recordEvery: number } {
  const rf = firstRf(scene.stages);
  const h = rf ? 1 / (rf.rf.frequency * scene.run.stepsPerCycle) : scene.run.stepNoRf;
  const steps = scene.run.maxTime / h;
  const recordEvery = Math.max(1, Math.ceil(steps / SAMPLE_POINTS));
  // Closed-form stages (drift, acceleration, reflectron) cross each stage in one step: points inside
  // them at the same density in time, so the turn in a reflectron shows.
  const recordSpacing = scene.run.maxTime / SAMPLE_POINTS;
  return {
    scene: { ...scene, ions: scene.ions.map((p) => ({ ...p, count: Math.min(p.count, SAMPLE_IONS) })), run: { ...scene.run, recordEvery, recordSpacing } },
    recordEvery,
  };
}

/** Points of the default m/z sweep of a filter report. */
const SWEEP_POINTS = 121;

/**
 * The quadrupole peak: an m/z sweep of the scene over its Mathieu m/z window (sim/mathieu) widened
 * by 10 % on each side, through sim/sweeps/sweep.ts on the exact transfer-matrix path. A scene
 * that path cannot take (gas, RF ramp, ...) gets no sweep here and the report says why; `iontrail
 * sweep --method direct` does it by integration.
 */
async function quadrupoleSweep(scene: Scene, opts: BundleOptions): Promise<{ result: SweepResult; curve: SweepCurve | null }> {
  const none = (reason: string) => ({ result: { status: 'unavailable' as const, reason }, curve: null });
  if (opts.sceneText === undefined || opts.sceneFile === null) return none('no scene file text to sweep');
  let sweepMod: typeof import('../../sim/sweeps/sweep.js');
  try {
    sweepMod = await import('../../sim/sweeps/sweep.js');
  } catch (e) {
    return none(`the m/z sweep module could not be loaded (${firstLine(e)})`);
  }
  const st = scene.stages.find(isQuadrupole);
  if (!st) return none('no quadrupole stage');
  const mz = scene.ions[0].mz;
  const win = mzWindow({ analyzer: 'quadrupole', r0: st.r0, freq: st.rf.frequency, rf: st.rf.amplitude, dc: st.dc, mz, charge: scene.ions[0].charge });
  let lo: number, hi: number;
  if (win && win.high !== null) { const w = win.high - win.low; lo = win.low - 0.1 * w; hi = win.high + 0.1 * w; }
  else { lo = 0.9 * mz; hi = 1.1 * mz; } // RF only: no upper edge; look around the scene's m/z
  lo = Number(Math.max(lo, 1e-3).toPrecision(5)); hi = Number(hi.toPrecision(5));
  const vary = `mz=${lo}..${hi}:${SWEEP_POINTS}`;
  try {
    const r = await sweepMod.runSweep({ sceneText: opts.sceneText, sceneFile: opts.sceneFile, set: opts.set, seed: opts.seed, vary: [vary], method: 'matrix', workers: opts.workers });
    const peak = r.peak ? { mz: r.peak.mz, fwhm_mz: r.peak.fwhm_mz, resolution_50: r.peak.resolution_50, resolution_10: r.peak.resolution_10, transmission: r.peak.transmission } : null;
    return {
      result: { status: 'done', varied: vary, points: r.points.length, ions_per_point: r.ionsPerPoint, method: r.method.used, peak, warnings: r.warnings },
      curve: { mz: r.points.map((p) => p.values[0]), transmission: r.points.map((p) => p.transmission), ions: r.ionsPerPoint, peak },
    };
  } catch (e) {
    if (e instanceof Error && (e.name === 'SweepError' || e.name === 'SceneError' || (e as { exitCode?: number }).exitCode === 2)) return none(firstLine(e));
    throw e;
  }
}

function firstLine(e: unknown): string {
  return (e instanceof Error ? e.message : String(e)).split('\n')[0];
}

/** Run the scene (and what the report needs beside it) and write the bundle at opts.out. */
export async function writeReportBundle(scene: Scene, opts: BundleOptions): Promise<BundleResult> {
  const t0 = performance.now();
  const startedAt = new Date().toISOString();
  const out = resolve(opts.out);
  checkBundleTarget(out, opts.force ?? false);
  const tmp = folderBeside(out);
  // Ctrl-C between the runs (while figures are drawn) must not leave the temporary folder behind:
  // note it and stop at the next step; during a run the engine's own handler finishes the run early.
  let stop = false;
  const offSignals = opts.handleSigint ? onStopSignal(() => { stop = true; }) : null;
  const step = () => { if (stop) throw new Interrupted(); };
  try {
    const traits = sceneTraits(scene);
    const bar = opts.progressLabel !== undefined ? progressBar(opts.progressLabel) : null;
    const summary = await runScene(scene, {
      out: join(tmp, RUN_FOLDER), workers: opts.workers, sceneFile: opts.sceneFile, commandLine: opts.commandLine,
      progress: bar?.update, handleSigint: opts.handleSigint, maxOutput: opts.maxOutput, onEstimate: opts.onEstimate,
    });
    bar?.end();
    if (!summary.complete) throw new Interrupted();
    step();

    let sample: ReportResults['provenance']['trajectory_sample'] = null;
    if (!traits.recordsTrajectories && !traits.spaceCharge) {
      const s = sampleScene(scene);
      const sum = await runScene(s.scene, { out: join(tmp, SAMPLE_FOLDER), workers: opts.workers, sceneFile: opts.sceneFile, commandLine: `${opts.commandLine} (trajectory sample)`, handleSigint: opts.handleSigint });
      if (!sum.complete) throw new Interrupted();
      sample = { folder: SAMPLE_FOLDER, ions_per_population: SAMPLE_IONS, record_every: s.recordEvery };
      step();
    }

    let sweep: SweepResult | null = null;
    let curve: SweepCurve | null = null;
    if (traits.kind === 'quadrupole') ({ result: sweep, curve } = await quadrupoleSweep(scene, opts));
    step();
    const beside = opts.beside && opts.sceneText !== undefined && opts.sceneFile !== null
      ? await besideReport({ scene: { file: opts.sceneFile, text: opts.sceneText }, other: opts.beside.other, vary: opts.beside.vary, set: opts.set ?? [], seed: opts.seed, workers: opts.workers, noSolve: opts.beside.noSolve })
      : null;
    step();

    const figures = await makeFigures({
      runDir: join(tmp, RUN_FOLDER), sampleDir: sample ? join(tmp, SAMPLE_FOLDER) : null, sampleName: sample ? `${SAMPLE_FOLDER}/` : undefined,
      kind: traits.kind, gas: traits.gas, sweep: curve,
      folderNames: new Map([[join(tmp, RUN_FOLDER), RUN_FOLDER], [join(tmp, SAMPLE_FOLDER), SAMPLE_FOLDER]]),
    });
    step();
    if (beside) figures.push(...beside.figures);
    for (const f of figures) writeFileSync(join(tmp, f.file), f.png);
    const results = buildResults({
      scene, summary, sweep, sample, runFolder: RUN_FOLDER,
      figures: figures.map(({ id, file, title, caption, width, height }, i) => ({ id, number: i + 1, file, title, caption, width, height })),
      commandLine: opts.commandLine, sceneFile: opts.sceneFile, startedAt,
      inputs: opts.sceneText !== undefined ? reportInputRows(scene, opts.sceneText, opts.sceneFile ?? 'scene', opts.set) : null,
      wallTimeS: (performance.now() - t0) / 1000,
    });
    if (beside) {
      results.beside = beside.result;
      for (const w of beside.warnings) if (!results.warnings.includes(w)) results.warnings.push(w);
      // The scene beside brings its own model (e.g. ideal hyperbolic fields beside solved round rods).
      for (const l of assumptions(beside.other, sceneTraits(beside.other))) if (!results.assumptions.includes(l)) results.assumptions.push(`${beside.other.name} (beside): ${l}`);
    }
    const doc = reportDocument(results);
    writeFileSync(join(tmp, 'results.json'), formatResults(results));
    writeFileSync(join(tmp, 'report.md'), reportMarkdown(doc));
    writeFileSync(join(tmp, 'report.html'), reportHtml(doc, new Map(figures.map((f) => [f.id, f.png]))));

    // The old bundle (allowed by checkBundleTarget with --force) leaves only now the new one is complete.
    swapFolderIntoPlace(tmp, out, true);
    return { dir: out, results, complete: true };
  } catch (e) {
    rmSync(tmp, { recursive: true, force: true });
    if (e instanceof Interrupted) return { dir: out, results: undefined as unknown as ReportResults, complete: false };
    throw e;
  } finally {
    offSignals?.();
  }
}

/** The flags `iontrail report` accepts (the help text describes each). */
export const FLAGS: FlagSpec = {
  values: ['out', 'seed', 'workers', 'set', 'max-output', 'beside', 'vary'],
  switches: ['force', 'help', 'no-solve'],
  repeatable: ['set'],
  aliases: { o: 'out', h: 'help' },
};

export async function run(argv: string[]): Promise<number> {
  const a = parseArgs(argv, FLAGS, 'report');
  if (a.switches.has('help')) { process.stdout.write(HELP); return 0; }
  if (a.positional.length !== 1) throw new UsageError(`report: give one scene file (${USAGE})`);
  const out = flag(a, 'out');
  if (!out) throw new UsageError('report: missing -o DIR (the bundle folder to write)');
  const file = a.positional[0];
  const seed = parseCount(flag(a, 'seed'), '--seed', 0);
  const workers = parseCount(flag(a, 'workers'), '--workers', 1);
  const force = a.switches.has('force');
  const limit = maxOutput(a);
  checkBundleTarget(out, force);
  const besideFile = flag(a, 'beside'), vary = flag(a, 'vary');
  if ((besideFile === undefined) !== (vary === undefined)) throw new UsageError('report: --beside OTHER.yaml and --vary mz=A..B:N go together');
  if (vary !== undefined && !vary.startsWith('mz=')) throw new UsageError(`report: --vary with --beside varies m/z (e.g. mz=496..508:41), got '${vary}'`);
  const set = a.values.get('set') ?? [];
  // The scene beside is read (and its --set checked) before any run, so a bad file stops at once.
  if (besideFile !== undefined && vary !== undefined) {
    const other = loadSceneFile(besideFile, { set, seed });
    // The m/z points checked against both scenes now, not after the scene's own run.
    try {
      for (const [f, t] of [[file, readFileSync(file, 'utf8')], [besideFile, other.text]]) parseVary(vary, t, f);
    } catch (e) {
      if (e instanceof SweepError) throw new UsageError(`--beside: ${e.message}`);
      throw e;
    }
  }
  const { scene, text } = loadSceneFile(file, { set, seed });
  await prepareTracking(file, scene, { noSolve: a.switches.has('no-solve'), workers });
  const r = await writeReportBundle(scene, {
    out, force, workers, sceneFile: file, commandLine: ['iontrail', 'report', ...argv].join(' '),
    progressLabel: 'report', handleSigint: true, sceneText: text, set, seed,
    maxOutput: limit, onEstimate: printEstimate(),
    beside: besideFile !== undefined && vary !== undefined ? { other: besideFile, vary, noSolve: a.switches.has('no-solve') } : undefined,
  });
  if (!r.complete) {
    process.stderr.write(`iontrail report: interrupted; nothing written to ${out}\n`);
    return interruptedExitCode();
  }
  for (const w of r.results.warnings) process.stderr.write(`warning: ${w}\n`);
  process.stdout.write(`${r.results.scene_name}\n  report  ${join(out, 'report.html')}  (${r.results.figures.length} figures; report.md, results.json, ${RUN_FOLDER}/)\n`);
  return 0;
}
