// Sweeps: transmission of a scene over one or two varied keys (m/z, DC, RF amplitude, energy, ...),
// the peak figures of m/z sweeps, and resolution against U/V along a family of scan lines
// (the resolution–transmission trade-off of a filter; Dawson 1976, ch. 2 and 6).
//
// Each point is the scene with the varied keys set (as --set overrides, validated by the scene
// loader). A linear point (ideal quadrupoles and drifts only) runs on the transfer-matrix path
// (linear-path.ts) unless direct integration is asked for; anything else runs the engine's
// integrator. Both use the same ions (startIon, same seed), so the methods are comparable ion by
// ion; the counts of a point are integers, independent of the number of workers.

import { availableParallelism, tmpdir } from 'node:os';
import { mkdtempSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { parse as parseYaml } from 'yaml';
import { parseScene } from '../scene/load.js';
import { SceneError } from '../scene/schema.js';
import type { QuadrupoleStage, Scene } from '../scene/types.js';
import { entryMakesQuadrupole, isQuadrupole } from '../stages/guards.js';
import { checkStartsInside, runScene, sceneForJson, sceneWarnings } from '../runs/run-scene.js';
import { Fate } from '../core/batch.js';
import { mzWindow } from '../mathieu/operating-point.js';
import { TOOL_VERSION } from '../version.js';
import { grid, parseVary, SweepError, MAX_POINTS, type SweepAxis } from './vary.js';
import { peakFigures, type PeakFigures } from '../analysis/peak.js';
import { wilsonInterval } from '../analysis/wilson.js';
import { LinearScratch, LinearTracker, nonLinearReason, StartStates } from '../fastpath/linear-path.js';
import { DirectPool, sweepRunSettings } from './direct-path.js';

export { SweepError } from './vary.js';
export type { PeakFigures } from '../analysis/peak.js';

export type SweepMethod = 'auto' | 'direct' | 'matrix';
export type PointMethod = 'direct' | 'matrix';

export interface SweepRequest {
  /** Scene file text and its name (for messages and provenance). */
  sceneText: string;
  sceneFile: string;
  /** --set overrides applied to every point before the varied keys. */
  set?: string[];
  seed?: number;
  /** One or two "KEY=A..B:N" specs; two give a map (first key outer, second inner). */
  vary: string[];
  /** "A..B:N" U/V ratios of the first quadrupole stage (needs one --vary mz). */
  scanLines?: string;
  method?: SweepMethod;
  /**
   * Figures of each point's run summary to collect, as dot paths into summary.json
   * (e.g. "space_charge.frequency_shift_z", "scan.species.0.fwhm_mz", "cooling.tau_s"). With it,
   * every point is a full run of the engine (space charge, mass scans, gas), written to a
   * temporary folder and read back; the columns follow `transmission` in sweep.csv.
   */
  collect?: string[];
  /** Threads for direct integration (default: all cores). The matrix path runs in this thread. */
  workers?: number;
  progress?: (done: number, total: number) => void;
  /** Output limit of each --collect point's run folder, bytes (runScene's 5 GB when absent). */
  maxOutput?: number;
  /** Asked before each point; true stops the sweep there (SIGINT/SIGTERM), keeping the points finished. */
  stopped?: () => boolean;
}

export interface SweepPoint {
  /** Values of the varied keys, in the order of the request (SI; m/z in Th). */
  values: number[];
  total: number;
  detected: number;
  transmission: number;
  method: PointMethod;
  /** Collected summary figures (see SweepRequest.collect), in the order asked; null where absent. */
  figures?: (number | null)[];
}

export interface ScanLine {
  u_over_v: number;
  /** DC of the stage on this line, V. */
  dc_v: number;
  peak: PeakFigures | null;
  /** Window of the first stability region along a/q = 2U/V at the peak (sim/mathieu), m/z. */
  mathieu_window: { low: number; high: number | null; resolution: number | null } | null;
  points: SweepPoint[];
}

export interface SweepResult {
  /** False when the sweep was stopped before its last point (the points finished are kept). */
  complete: boolean;
  axes: { key: string; unit: string; values: number[] }[];
  points: SweepPoint[];
  /** One m/z axis: figures of the transmission peak (null when nothing is transmitted). */
  peak: PeakFigures | null;
  /** An m/z axis and one other key: the peak at each value of the other key. */
  peaks: { key: string; value: number; peak: PeakFigures | null }[] | null;
  scanLines: { stage: number; rf_amplitude_v: number; lines: ScanLine[] } | null;
  /** Summary figures collected per point (column names of sweep.csv after transmission). */
  collect: string[];
  method: { requested: SweepMethod; used: PointMethod | 'mixed'; direct_because: string | null };
  /** The scene as resolved at the first point (varied keys at their first values). */
  scene: Scene;
  sceneFile: string;
  seed: number;
  ionsPerPoint: number;
  workers: number;
  startedAt: string;
  wallSeconds: number;
  warnings: string[];
}

/** One point of a sweep: a grid index on the main grid (line −1) or on scan line `line`. */
export interface SweepTask {
  line: number;
  idx: number[];
  /** --set overrides of the line (its DC), applied after the varied keys. */
  extra: string[];
}

/**
 * What a sweep will run, validated in full before the first point: the axes, the scan lines and
 * the points in run order (the main grid, then each scan line's grid). Any contiguous range of
 * `tasks` can run on its own (runPointRange) and the ranges' points reduce to the whole sweep.
 */
export interface SweepPlan {
  req: SweepRequest;
  requested: SweepMethod;
  axes: SweepAxis[];
  scenes: PointScenes;
  /** The scene at the first point. */
  base: Scene;
  scan: { stage: number; fileIndex: number; rf: number; ratios: number[] } | null;
  workers: number;
  collect: string[];
  tasks: SweepTask[];
  warnings: string[];
  /** Why direct integration ran, as the first point that needed it said (filled while running). */
  directBecause?: string | null;
  startedAt: Date;
  t0: number;
}

/** Plan a sweep. Validates every request detail before the first point runs. */
export function planSweep(req: SweepRequest): SweepPlan {
  const startedAt = new Date();
  const t0 = performance.now();
  const requested = req.method ?? 'auto';
  if (!['auto', 'direct', 'matrix'].includes(requested)) throw new SweepError(`--method expects auto, direct or matrix, got '${requested}'`);
  if (req.vary.length < 1 || req.vary.length > 2) throw new SweepError(`give one or two --vary KEY=A..B:N (got ${req.vary.length})`);
  const axes = req.vary.map((v) => parseVary(v, req.sceneText, req.sceneFile));
  if (axes.length === 2 && axes[0].key === axes[1].key) throw new SweepError(`--vary ${axes[0].key} given twice`);
  const nPoints = axes.reduce((a, x) => a * x.values.length, 1);
  if (nPoints > MAX_POINTS) throw new SweepError(`the sweep has ${nPoints} points; at most ${MAX_POINTS}`);

  const scenes = new PointScenes(req);
  // Validate the corners (units, ranges, keys) and the method before any work.
  const corners = cornerIndices(axes);
  for (const idx of corners) pointMethod(scenes.scene(axes, idx, []), requested);
  const base = scenes.scene(axes, axes.map(() => 0), []);

  let scan: SweepPlan['scan'] = null;
  if (req.scanLines !== undefined) {
    if (axes.length !== 1 || axes[0].key !== 'mz') throw new SweepError('--scan-lines needs exactly one --vary mz=A..B:N (the m/z range of each line)');
    const ratios = parseRatios(req.scanLines);
    if (nPoints * (1 + ratios.length) > MAX_POINTS) throw new SweepError(`the sweep and its ${ratios.length} scan lines have ${nPoints * (1 + ratios.length)} points; at most ${MAX_POINTS}`);
    const fileIndex = firstQuadrupoleInFile(req.sceneText);
    const stage = base.stages.findIndex(isQuadrupole);
    if (fileIndex < 0 || stage < 0) throw new SweepError(`--scan-lines: ${req.sceneFile} has no quadrupole stage`);
    const rf = (base.stages[stage] as QuadrupoleStage).rf.amplitude;
    if (!(rf > 0)) throw new SweepError(`--scan-lines: stage ${fileIndex} has no RF amplitude`);
    scan = { stage: fileIndex, fileIndex, rf, ratios };
    for (const r of [ratios[0], ratios[ratios.length - 1]]) pointMethod(scenes.scene(axes, [0], scanSet(scan.fileIndex, r, rf)), requested);
  }

  const workers = Math.max(1, req.workers ?? availableParallelism());
  const collect = req.collect ?? [];
  if (collect.length > 0 && requested === 'matrix') throw new SweepError('--collect runs every point in full; it does not combine with --method matrix');
  if (collect.length > 0 && scan) throw new SweepError('--collect does not combine with --scan-lines');
  for (const c of collect) if (!/^[A-Za-z_][\w]*(\.[\w]+)*$/.test(c)) throw new SweepError(`--collect expects dot paths into summary.json such as space_charge.frequency_shift_z, got '${c}'`);
  const tasks: SweepTask[] = gridTasks(axes, -1, []);
  if (scan) scan.ratios.forEach((ratio, line) => { for (const t of gridTasks(axes, line, scanSet(scan!.fileIndex, ratio, scan!.rf))) tasks.push(t); });
  const warnings = sceneWarnings(base).filter((w) => !w.startsWith('space_charge'));
  return { req, requested, axes, scenes, base, scan, workers, collect, tasks, warnings, startedAt, t0 };
}

/** Grid points in run order: first key outer, second inner. */
function gridTasks(axes: SweepAxis[], line: number, extra: string[]): SweepTask[] {
  const out: SweepTask[] = [];
  const n0 = axes[0].values.length, n1 = axes.length > 1 ? axes[1].values.length : 1;
  for (let i = 0; i < n0; i++) for (let j = 0; j < n1; j++) out.push({ line, idx: axes.length > 1 ? [i, j] : [i], extra });
  return out;
}

/**
 * Run the plan's points from..to−1 (one runner: its workers and fast-path state serve them all).
 * Fewer come back when the request's `stopped` said stop (the points before it are whole).
 */
export async function runPointRange(plan: SweepPlan, from: number, to: number, tick: () => void = () => {}): Promise<SweepPoint[]> {
  const pieces: SweepPiece[] = [];
  for (let k = from; k < to; k++) pieces.push({ task: k });
  return runPieces(plan, pieces, tick);
}

/** A point of the plan, or only its ions from..to−1 (a shard's piece of a point). */
export interface SweepPiece { task: number; ions?: [number, number] }

/**
 * Run pieces of the plan in order (one runner: its workers and fast-path state serve them all).
 * A piece with an ion range counts those ions only (total and detected of the range): counts are
 * integers, so the pieces of a point add up to the whole point exactly.
 */
export async function runPieces(plan: SweepPlan, pieces: SweepPiece[], tick: () => void = () => {}): Promise<SweepPoint[]> {
  const runner = new PointRunner(plan.collect.length > 0 ? 'direct' : plan.requested, plan.workers, plan.collect, plan.req.maxOutput);
  const out: SweepPoint[] = [];
  try {
    for (const piece of pieces) {
      if (plan.req.stopped?.()) break;
      const t = plan.tasks[piece.task];
      const r = await runner.run(plan.scenes.scene(plan.axes, t.idx, t.extra), piece.ions);
      out.push({ values: t.idx.map((i, a) => plan.axes[a].values[i]), ...r });
      tick();
    }
    plan.directBecause ??= runner.directBecause;
    return out;
  } finally {
    await runner.close();
  }
}

/** The whole sweep's figures from all its points (in plan order). */
export function reduceSweep(plan: SweepPlan, all: SweepPoint[]): SweepResult {
  const { axes, scan, base } = plan;
  if (all.length !== plan.tasks.length) throw new SweepError(`a sweep of ${plan.tasks.length} points got ${all.length}`);
  const warnings = new Set<string>(plan.warnings);
  const main = all.filter((_, k) => plan.tasks[k].line === -1);
  let lines: ScanLine[] | null = null;
  if (scan) {
    lines = [];
    for (let line = 0; line < scan.ratios.length; line++) {
      const ratio = scan.ratios[line];
      const pts = all.filter((_, k) => plan.tasks[k].line === line);
      const peak = peakOf(axes[0].values, pts);
      const st = base.stages[scan.stage] as QuadrupoleStage;
      const win = mzWindow({ analyzer: 'quadrupole', r0: st.r0, freq: st.rf.frequency, rf: scan.rf, dc: ratio * scan.rf, mz: peak?.mz ?? axes[0].values[0], charge: base.ions[0].charge });
      lines.push({ u_over_v: ratio, dc_v: ratio * scan.rf, peak, mathieu_window: win, points: pts });
      if (peak && peak.fwhm_mz === null) warnings.add(`scan line U/V = ${ratio}: the peak is wider than the m/z range; widen --vary mz`);
    }
  }
  const peak = axes.length === 1 && axes[0].key === 'mz' ? peakOf(axes[0].values, main) : null;
  if (peak && peak.fwhm_mz === null) warnings.add('the peak is not bounded at half height inside the m/z range; widen --vary mz');
  const step = axes[0].values.length > 1 ? Math.abs(axes[0].values[1] - axes[0].values[0]) : 0;
  if (peak && peak.fwhm_mz !== null && peak.fwhm_mz < 3 * step) {
    warnings.add(`the FWHM (${Number(peak.fwhm_mz.toPrecision(3))}) spans fewer than 3 sweep steps of ${step}; the widths and resolutions are coarse, refine the m/z step`);
  }
  if (axes.length === 1 && axes[0].key === 'mz' && peak === null) warnings.add('no ion is transmitted at any m/z of the sweep');
  let peaks: SweepResult['peaks'] = null;
  if (axes.length === 2 && (axes[0].key === 'mz' || axes[1].key === 'mz')) {
    const mzAxis = axes[0].key === 'mz' ? 0 : 1, other = 1 - mzAxis;
    peaks = axes[other].values.map((value, j) => {
      const row = main.filter((_, k) => (other === 0 ? Math.floor(k / axes[1].values.length) : k % axes[1].values.length) === j);
      return { key: axes[other].key, value, peak: peakOf(axes[mzAxis].values, row) };
    });
  }
  const used = new Set(all.map((p) => p.method));
  return {
    complete: true,
    axes: axes.map((a) => ({ key: a.key, unit: a.unit, values: a.values })),
    points: main,
    peak, peaks,
    scanLines: scan && lines ? { stage: scan.fileIndex, rf_amplitude_v: scan.rf, lines } : null,
    collect: plan.collect,
    method: { requested: plan.requested, used: used.size === 1 ? [...used][0] : 'mixed', direct_because: used.has('direct') ? plan.directBecause ?? null : null },
    scene: base,
    sceneFile: plan.req.sceneFile,
    seed: base.seed,
    ionsPerPoint: base.ions.reduce((a, p) => a + p.count, 0),
    workers: plan.workers,
    startedAt: plan.startedAt.toISOString(),
    wallSeconds: (performance.now() - plan.t0) / 1000,
    warnings: [...warnings],
  };
}

/**
 * A stopped sweep: the main-grid points finished, in order, without the figures that need every
 * point (peak, peaks per row, scan lines); marked incomplete with a warning that says so.
 */
export function reduceFinished(plan: SweepPlan, done: SweepPoint[], stoppedBy: string): SweepResult {
  if (done.length >= plan.tasks.length) return reduceSweep(plan, done);
  const main = done.filter((_, k) => plan.tasks[k].line === -1);
  const used = new Set(done.map((p) => p.method));
  return {
    complete: false,
    axes: plan.axes.map((a) => ({ key: a.key, unit: a.unit, values: a.values })),
    points: main, peak: null, peaks: null, scanLines: null,
    collect: plan.collect,
    method: { requested: plan.requested, used: used.size === 1 ? [...used][0] : used.size === 0 ? (plan.requested === 'direct' ? 'direct' : 'matrix') : 'mixed', direct_because: used.has('direct') ? plan.directBecause ?? null : null },
    scene: plan.base, sceneFile: plan.req.sceneFile, seed: plan.base.seed,
    ionsPerPoint: plan.base.ions.reduce((a, p) => a + p.count, 0),
    workers: plan.workers, startedAt: plan.startedAt.toISOString(), wallSeconds: (performance.now() - plan.t0) / 1000,
    warnings: [...plan.warnings, `interrupted (${stoppedBy}): ${done.length} of ${plan.tasks.length} points finished; sweep.csv holds the ${main.length} points of the main grid finished, without peak or scan-line figures`],
  };
}

/** Run a sweep: plan (every check first), run all its points, reduce (reduceFinished when stopped). */
export async function runSweep(req: SweepRequest): Promise<SweepResult> {
  const plan = planSweep(req);
  let done = 0;
  const points = await runPointRange(plan, 0, plan.tasks.length, () => req.progress?.(++done, plan.tasks.length));
  return points.length < plan.tasks.length ? reduceFinished(plan, points, 'a stop request') : reduceSweep(plan, points);
}

function peakOf(x: number[], pts: SweepPoint[]): PeakFigures | null {
  return peakFigures(x, pts.map((p) => p.transmission));
}

/** The method of a point, or a SweepError when --method matrix meets a non-linear scene. */
function pointMethod(scene: Scene, requested: SweepMethod): { method: PointMethod; reason: string | null } {
  checkStartsInside(scene);
  const reason = nonLinearReason(scene);
  if (requested === 'matrix' && reason !== null) {
    throw new SweepError(`--method matrix needs a linear scene (ideal quadrupole and drift stages, no gas, no space charge, no RF ramp); this one has ${reason}`);
  }
  if (requested === 'direct') return { method: 'direct', reason: 'asked for (--method direct)' };
  return reason === null ? { method: 'matrix', reason: null } : { method: 'direct', reason };
}

/**
 * Runs one point by either method; keeps the start-state draws and the trackers' working memory
 * for reuse by the matrix path at the next point.
 */
class PointRunner {
  private pool: DirectPool | null = null;
  private starts: StartStates | null = null;
  private linear: LinearScratch | null = null;
  private fate = new Int8Array(0);
  directBecause: string | null = null;

  constructor(private readonly requested: SweepMethod, private readonly workers: number, private readonly collect: string[] = [], private readonly maxOutput?: number) {}

  /** A full engine run of the point into a temporary folder; its summary gives the figures. */
  private async full(scene: Scene, total: number) {
    const dir = mkdtempSync(join(tmpdir(), 'iontrail-sweep-'));
    try {
      const s = await runScene({ ...scene, run: { ...scene.run, recordEvery: 0 } }, { out: join(dir, 'run'), workers: this.workers, maxOutput: this.maxOutput });
      this.directBecause ??= 'full runs for --collect';
      const figures = this.collect.map((path) => {
        let v: unknown = s;
        for (const k of path.split('.')) v = v !== null && typeof v === 'object' ? (v as Record<string, unknown>)[k] : undefined;
        return typeof v === 'number' && Number.isFinite(v) ? v : null;
      });
      return { total, detected: s.ions.detected, transmission: total > 0 ? s.ions.detected / total : 0, method: 'direct' as PointMethod, figures };
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  }

  /** The point, or its ions range[0]..range[1]−1 only (total and detected of the range). */
  async run(scene: Scene, range?: [number, number]): Promise<{ total: number; detected: number; transmission: number; method: PointMethod; figures?: (number | null)[] }> {
    const { method, reason } = pointMethod(scene, this.requested);
    const all = scene.ions.reduce((a, p) => a + p.count, 0);
    const [from, to] = range ?? [0, all];
    const total = to - from;
    if (this.collect.length > 0) return this.full(scene, total);
    let detected: number;
    if (method === 'matrix') {
      detected = this.matrix(scene, all, from, to);
    } else {
      this.directBecause ??= reason;
      this.pool ??= new DirectPool(this.workers);
      detected = await this.pool.count(sweepRunSettings(scene), from, to);
    }
    return { total, detected, transmission: total > 0 ? detected / total : 0, method };
  }

  private matrix(scene: Scene, total: number, from: number, to: number): number {
    // Reuse the start draws while they serve the point (at most 4 million ions kept).
    if (total <= 4_000_000 && (this.starts === null || !this.starts.serves(scene))) this.starts = new StartStates(scene);
    this.linear ??= new LinearScratch();
    const tracker = new LinearTracker(scene, { scratch: this.linear });
    if (this.fate.length < Math.min(total, 65536)) this.fate = new Int8Array(Math.min(total, 65536));
    const fate = this.fate;
    let d = 0;
    for (let start = from; start < to; start += fate.length) {
      const n = Math.min(fate.length, to - start);
      tracker.track(start, n, fate, undefined, total <= 4_000_000 ? this.starts! : undefined);
      for (let i = 0; i < n; i++) if (fate[i] === Fate.detected) d++;
    }
    tracker.release();
    return d;
  }

  async close(): Promise<void> {
    await this.pool?.close();
  }
}

/**
 * Scenes of the points. Keys other than m/z go through the scene loader (validation, units); m/z
 * only changes each population's m/z, so those points reuse a parsed scene.
 */
class PointScenes {
  private cache = new Map<string, Scene>();
  constructor(private readonly req: SweepRequest) {}

  scene(axes: SweepAxis[], idx: number[], extra: string[]): Scene {
    const sets: string[] = [...extra];
    let mz: number | null = null;
    axes.forEach((a, k) => {
      const v = a.values[idx[k]];
      if (a.key === 'mz') mz = v; else sets.push(...a.overrides(v));
    });
    const key = sets.join('\n');
    let s = this.cache.get(key);
    if (!s) {
      s = this.parse(sets, axes);
      if (this.cache.size > 64) this.cache.clear();
      this.cache.set(key, s);
    }
    if (mz === null) return s;
    const m: number = mz;
    return { ...s, ions: s.ions.map((p) => ({ ...p, mz: m })) };
  }

  private parse(sets: string[], axes: SweepAxis[]): Scene {
    try {
      return parseScene(this.req.sceneText, this.req.sceneFile, { set: [...(this.req.set ?? []), ...sets], seed: this.req.seed });
    } catch (e) {
      // A varied key's problem reads as --vary, not as the --set it became.
      if (e instanceof SceneError) {
        let msg = e.message;
        for (const a of axes) msg = msg.split(`--set ${a.key}`).join(`--vary ${a.key}`);
        throw new SceneError(msg);
      }
      throw e;
    }
  }
}

function cornerIndices(axes: SweepAxis[]): number[][] {
  const ends = (a: SweepAxis) => [0, a.values.length - 1];
  if (axes.length === 1) return ends(axes[0]).map((i) => [i]);
  return ends(axes[0]).flatMap((i) => ends(axes[1]).map((j) => [i, j]));
}

const RATIOS = /^(.+?)\.\.(.+?):(\d+)$/;

/** "0.160..0.167:8" → 8 U/V ratios. */
export function parseRatios(spec: string): number[] {
  const m = RATIOS.exec(spec.trim());
  if (!m) throw new SweepError(`--scan-lines expects A..B:N of U/V ratios such as 0.160..0.167:8, got '${spec}'`);
  const a = Number(m[1]), b = Number(m[2]), n = Number(m[3]);
  if (!Number.isFinite(a) || !Number.isFinite(b) || m[1].trim() === '' || m[2].trim() === '') {
    throw new SweepError(`--scan-lines expects plain numbers (U/V ratios) such as 0.160..0.167:8, got '${spec}'`);
  }
  if (n < 2) throw new SweepError(`--scan-lines: N must be at least 2, got ${n}`);
  if (n > 1000) throw new SweepError(`--scan-lines: at most 1000 lines, got ${n}`);
  if (a < 0 || b < 0 || a >= 0.5 || b >= 0.5) throw new SweepError(`--scan-lines: U/V ratios lie in [0, 0.5) (the first region ends near 0.168), got '${spec}'`);
  return grid(a, b, n);
}

function scanSet(fileIndex: number, ratio: number, rf: number): string[] {
  return [`stages.${fileIndex}.dc=${Number((ratio * rf).toPrecision(15))} V`];
}

function firstQuadrupoleInFile(text: string): number {
  try {
    const raw = parseYaml(text) as { stages?: { type?: string }[] };
    return Array.isArray(raw?.stages) ? raw.stages.findIndex((s) => entryMakesQuadrupole(s?.type)) : -1;
  } catch {
    return -1;
  }
}

// ---- Output folder ---------------------------------------------------------------------------

export const SWEEP_FILES = { csv: 'sweep.csv', summary: 'summary.json', scanLines: 'scan-lines.csv', scanLinePoints: 'scan-line-points.csv' } as const;

export const CAUTIONS = [
  'Ideal fields: no fringe fields, no rod misalignment, no space charge; verify every operating point on the bench before relying on it.',
  'RF and DC supplies of a mass filter carry lethal voltages: follow local electrical-safety codes and let qualified staff work on live hardware.',
];

function num(v: number | null): string {
  return v === null ? '' : String(v);
}

/** The 95 % Wilson score interval of a point's transmission (sim/analysis/wilson.ts). */
function interval(p: { detected: number; total: number }): [number, number] {
  return wilsonInterval(p.detected, p.total);
}

/**
 * sweep.csv: one column per varied key (named as given), then total, detected, transmission and
 * its 95 % Wilson score interval (transmission_low, transmission_high), then collected figures.
 */
export function sweepCsv(r: SweepResult): string {
  const lines = [[...r.axes.map((a) => a.key), 'total', 'detected', 'transmission', 'transmission_low', 'transmission_high', ...r.collect].join(',')];
  for (const p of r.points) lines.push([...p.values.map(String), p.total, p.detected, p.transmission, ...interval(p), ...(p.figures ?? []).map(num)].join(','));
  return lines.join('\n') + '\n';
}

export function scanLinesCsv(r: SweepResult): string | null {
  if (!r.scanLines) return null;
  const lines = ['u_over_v,dc_v,mz,fwhm_mz,resolution_50,resolution_10,transmission,mathieu_low_mz,mathieu_high_mz,mathieu_resolution'];
  for (const l of r.scanLines.lines) {
    const p = l.peak, w = l.mathieu_window;
    lines.push([l.u_over_v, l.dc_v, num(p?.mz ?? null), num(p?.fwhm_mz ?? null), num(p?.resolution_50 ?? null), num(p?.resolution_10 ?? null),
      num(p?.transmission ?? 0), num(w?.low ?? null), num(w?.high ?? null), num(w?.resolution ?? null)].join(','));
  }
  return lines.join('\n') + '\n';
}

export function scanLinePointsCsv(r: SweepResult): string | null {
  if (!r.scanLines) return null;
  const lines = ['u_over_v,mz,total,detected,transmission,transmission_low,transmission_high'];
  for (const l of r.scanLines.lines) for (const p of l.points) lines.push([l.u_over_v, p.values[0], p.total, p.detected, p.transmission, ...interval(p)].join(','));
  return lines.join('\n') + '\n';
}

export interface SummaryOptions {
  commandLine?: string;
  /** Keys added at the end of provenance (a merge's parts). */
  provenance?: Record<string, unknown>;
}

/** The peak figures with the 95 % Wilson interval of the transmission at the maximum. */
function peakWithInterval(peak: PeakFigures | null, points: SweepPoint[]): Record<string, unknown> | null {
  if (peak === null) return null;
  const at = points.find((p) => p.values[0] === peak.mz_at_max && p.transmission === peak.transmission);
  if (at === undefined) return { ...peak };
  const [low, high] = interval(at);
  const out: Record<string, unknown> = {};
  // Right after `transmission`, in the key order of PeakFigures otherwise.
  for (const [k, v] of Object.entries(peak)) {
    out[k] = v;
    if (k === 'transmission') { out.transmission_low = low; out.transmission_high = high; }
  }
  return out;
}

/** summary.json content (key order fixed; SI numbers, m/z in Th). */
export function sweepSummary(r: SweepResult, opts: SummaryOptions = {}): Record<string, unknown> {
  const out: Record<string, unknown> = {
    complete: r.complete,
    scene_name: r.scene.name,
    sweep: {
      keys: r.axes.map((a) => a.key),
      units: Object.fromEntries(r.axes.map((a) => [a.key, a.unit])),
      values: Object.fromEntries(r.axes.map((a) => [a.key, a.values.length])),
      points: r.points.length,
      ions_per_point: r.ionsPerPoint,
    },
    peak: peakWithInterval(r.peak, r.points),
  };
  if (r.peaks) out.peaks = r.peaks;
  if (r.collect.length > 0) {
    out.collected = {
      figures: r.collect,
      points: r.points.map((p) => ({ values: p.values, ...Object.fromEntries(r.collect.map((c, k) => [c, p.figures?.[k] ?? null])) })),
    };
  }
  if (r.scanLines) {
    out.scan_lines = {
      stage: r.scanLines.stage,
      rf_amplitude_v: r.scanLines.rf_amplitude_v,
      // The trade-off: resolution rises and transmission falls as U/V approaches the apex.
      tradeoff: r.scanLines.lines.map((l) => ({
        u_over_v: l.u_over_v, dc_v: l.dc_v,
        mz: l.peak?.mz ?? null, fwhm_mz: l.peak?.fwhm_mz ?? null,
        resolution_50: l.peak?.resolution_50 ?? null, resolution_10: l.peak?.resolution_10 ?? null,
        transmission: l.peak?.transmission ?? 0,
        transmission_low: peakWithInterval(l.peak, l.points)?.transmission_low ?? null,
        transmission_high: peakWithInterval(l.peak, l.points)?.transmission_high ?? null,
        mathieu_window: l.mathieu_window,
      })),
    };
  }
  out.method = r.method;
  out.warnings = r.warnings;
  out.cautions = CAUTIONS;
  out.provenance = {
    tool_version: TOOL_VERSION,
    scene: sceneForJson(r.scene),
    scene_file: r.sceneFile,
    seed: r.seed,
    command_line: opts.commandLine ?? '',
    method: r.method.used,
    integrator: {
      method: r.method.used === 'matrix' ? 'transfer-matrix' : r.method.used === 'direct' ? r.scene.run.integrator : `transfer-matrix and ${r.scene.run.integrator}`,
      steps_per_cycle: r.scene.run.stepsPerCycle,
      ...(r.scene.run.integrator === 'dopri5' && r.method.used !== 'matrix' ? { tolerance: r.scene.run.tolerance } : {}),
      max_time_s: r.scene.run.maxTime,
      ...(r.method.used !== 'direct' ? { transfer_matrix: 'one RF period per axis (RK4 table, 640+ grid points per period), checks at the rk4 step times (steps_per_cycle per period) and at the stage exit' } : {}),
    },
    workers: r.workers,
    started_at: r.startedAt,
    wall_s: r.wallSeconds,
    ...opts.provenance,
  };
  out.units = { mz: 'Th (u/e)', transmission: 'fraction of ions detected', transmission_low: '95 % Wilson score interval (Wilson 1927), lower end', transmission_high: '95 % Wilson score interval, upper end', voltage: 'V', length: 'm', time: 's', energy: 'eV', frequency: 'Hz' };
  return out;
}
