// What a run will cost before it starts: ion-steps, run time and bytes written, from the scene
// alone. Both are upper bounds for the stepped stages (every ion is assumed to live to max_time,
// as sim/engine/batches.ts assumes when it sizes batches); ions lost or detected early cost less.
// A run whose bound exceeds the output limit is refused before anything is written.

import type { Scene } from '../scene/types.js';
import { firstRf, kindOf } from '../stages/registry.js';

/** Bytes of one trajectories.arrow point: ion int32 + t, x, y, z, vx, vy, vz float64. */
export const TRAJECTORY_POINT_BYTES = 4 + 7 * 8;
/**
 * Bytes of one ions.arrow row: 4 int32 + 16 float64 = 144 B of values, the fate string and its
 * offset (~12 B); measured 161–188 B per row on the demo scenes (Arrow IPC buffers and padding).
 */
export const ION_ROW_BYTES = 190;
/** A trajectory point as CSV text (8 numbers of ~20 characters); measured on a small run. */
export const TRAJECTORY_CSV_POINT_BYTES = 170;
export const ION_CSV_ROW_BYTES = 400;
/** Fixed part: summary.json (scene and provenance), history.arrow, Arrow headers. */
export const FIXED_BYTES = 200_000;
/**
 * Ion-steps per second per worker assumed for the time estimate: measured 5–7 M/s per worker on
 * a 2-core build machine for the RK4 quadrupole and trap kernels (common practice, no source;
 * the progress line shows the real rate once the run has started).
 */
export const NOMINAL_STEPS_PER_S = 5e6;
/**
 * Ions per second per worker for what does not scale with steps (start draw, stage hand-over,
 * the ions table): a 10⁷-ion trap run of a few steps per ion took 26.8 s on 2 workers, about
 * 2·10⁵ ions/s per worker (measured on the build machine; common practice, no source).
 */
export const NOMINAL_IONS_PER_S = 2e5;

/** Output that needs --max-output to go ahead: 5 GB (decimal), the limit. */
export const DEFAULT_MAX_OUTPUT = 5e9;

export interface RunEstimate {
  ions: number;
  /** Recorded points per ion (upper bound), 0 when nothing is recorded. */
  points_per_ion: number;
  /** Integration steps of the whole run (upper bound; closed-form stages count none). */
  ion_steps: number;
  /** Bytes of the run folder (upper bound). */
  output_bytes: number;
  /**
   * Seconds on one worker at NOMINAL_STEPS_PER_S and NOMINAL_IONS_PER_S (divide by the workers:
   * batches are independent). Kept per worker so that summary.json is the same for any count.
   */
  cpu_time_s: number;
}

/** Whether some ion is stepped (not advanced in closed form) somewhere in the scene. */
function stepped(scene: Scene): boolean {
  // Uniform-field kinds (drift, acceleration gap) advance an ion in closed form unless gas asks for
  // a fixed step (sim/stages/shared/uniform-kernel.ts); every other kind integrates.
  return scene.stages.some((st) => !kindOf(st).uniformField || st.gas !== undefined || scene.gas !== undefined);
}

/** `coupledSteps`: the steps of a space-charge run (sim/engine/coupled-step.ts), which moves every ion on each. */
export function estimateRun(scene: Scene, opts: { csv?: boolean; coupledSteps?: number } = {}): RunEstimate {
  const ions = scene.ions.reduce((a, p) => a + p.count, 0);
  const rf = firstRf(scene.stages);
  const h = rf ? 1 / rf.rf.frequency / scene.run.stepsPerCycle : scene.run.stepNoRf;
  const stepsPerIon = opts.coupledSteps ?? (stepped(scene) ? scene.run.maxTime / h : 0);
  // Points at the start, at every stage boundary and every record_every steps (batches.ts).
  const record = scene.run.recordEvery > 0;
  const pointsPerIon = record ? Math.ceil(stepsPerIon / scene.run.recordEvery) + 2 * scene.stages.length + 2 : 0;
  const pointBytes = TRAJECTORY_POINT_BYTES + (opts.csv ? TRAJECTORY_CSV_POINT_BYTES : 0);
  const rowBytes = ION_ROW_BYTES + (opts.csv ? ION_CSV_ROW_BYTES : 0);
  const outputBytes = ions * (pointsPerIon * pointBytes + rowBytes) + FIXED_BYTES;
  const ionSteps = ions * stepsPerIon;
  return {
    ions, points_per_ion: pointsPerIon, ion_steps: Math.round(ionSteps), output_bytes: Math.round(outputBytes),
    cpu_time_s: Number((ionSteps / NOMINAL_STEPS_PER_S + ions / NOMINAL_IONS_PER_S).toPrecision(3)),
  };
}

/** An output limit that refuses a run (one line, exit 2, nothing written). */
export class OutputLimitError extends Error {
  override name = 'OutputLimitError';
  readonly exitCode = 2;
}

/** Refuse a run whose estimated output exceeds `maxBytes` (default DEFAULT_MAX_OUTPUT). */
export function checkOutputLimit(e: RunEstimate, maxBytes = DEFAULT_MAX_OUTPUT): void {
  if (e.output_bytes <= maxBytes) return;
  const why = e.points_per_ion > 0 ? ` (${e.ions} ions × ${e.points_per_ion} recorded points; raise run.record_every or set it to 0)` : ` (${e.ions} ions)`;
  throw new OutputLimitError(`the run would write about ${formatBytes(e.output_bytes)}${why}, above the ${formatBytes(maxBytes)} limit; give --max-output ${formatBytes(Math.ceil(e.output_bytes / 1e9) * 1e9).replace(' ', '')} to allow it`);
}

const SIZE = /^\s*(\d+(?:\.\d+)?)\s*([kKMGT]i?B|B)?\s*$/;
const FACTOR: Record<string, number> = { B: 1, kB: 1e3, KB: 1e3, MB: 1e6, GB: 1e9, TB: 1e12, KiB: 1024, MiB: 2 ** 20, GiB: 2 ** 30, TiB: 2 ** 40 };

/** "20GB", "500 MB", "2GiB" (decimal kB/MB/GB/TB, binary KiB/MiB/GiB/TiB) or plain bytes → bytes. */
export function parseByteSize(text: string, what = '--max-output'): number {
  const m = SIZE.exec(text);
  const factor = m ? FACTOR[m[2] ?? 'B'] : undefined;
  if (!m || factor === undefined) throw new OutputLimitError(`${what} expects a size such as 20GB, 500MB or 2GiB, got '${text}'`);
  return Number(m[1]) * factor;
}

/** 5.7 GB, 312 MB, 48 kB (decimal units, three significant digits). */
export function formatBytes(b: number): string {
  const units: [number, string][] = [[1e12, 'TB'], [1e9, 'GB'], [1e6, 'MB'], [1e3, 'kB']];
  for (const [f, u] of units) if (b >= f) return `${Number((b / f).toPrecision(3))} ${u}`;
  return `${Math.round(b)} B`;
}

/** "under 1 s", "about 3.2 s", "about 14 min", "about 2.5 h", "about 3.1 days". */
export function aboutDuration(s: number): string {
  return s < 1 ? 'under 1 s' : `about ${formatDuration(s)}`;
}

/** "3.2 s", "14 min", "2.5 h", "3.1 days". */
export function formatDuration(s: number): string {
  if (s < 60) return `${Number(s.toPrecision(2))} s`;
  if (s < 3600) return `${Number((s / 60).toPrecision(2))} min`;
  if (s < 86400 * 2) return `${Number((s / 3600).toPrecision(2))} h`;
  return `${Number((s / 86400).toPrecision(2))} days`;
}

/** One stderr line: "estimate: 1000 ions, at most 312 MB of output, about 14 min on 2 workers (...)". */
export function estimateLine(e: RunEstimate, workers: number): string {
  const steps = e.ion_steps > 0 ? `${e.ion_steps.toPrecision(2)} ion-steps at most` : 'closed-form flight, no steps';
  return `estimate: ${e.ions} ions, at most ${formatBytes(e.output_bytes)} of output, ${aboutDuration(e.cpu_time_s / workers)} on ${workers} worker${workers === 1 ? '' : 's'} (${steps})`;
}
