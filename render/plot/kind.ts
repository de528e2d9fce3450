// What a figure kind is: a name, the flags it takes, and a builder from a run folder to a figure.

import { estimateTrajectoryRows, type RunFolder } from '../../sim/runfolder/index.js';
import type { FigureSpec } from './figure.js';

export interface KindOptions {
  /** Value flags given on the command line, by name without "--". */
  values: Map<string, string>;
  /** Switches given. */
  switches: Set<string>;
  /** Page size in pixels. */
  width: number;
  height: number;
}

export interface PlotKind {
  name: string;
  describe: string;
  /** Value flags of this kind: name → help text. */
  flags: Record<string, string>;
  /** Switches of this kind: name → help text. */
  switches?: Record<string, string>;
  build(run: RunFolder, opt: KindOptions): Promise<FigureSpec>;
}

/** Error in a kind's flags or in what the run folder holds for that kind: one line, exit 2. */
export class PlotError extends Error {
  override name = 'UsageError';
  readonly exitCode = 2;
}

export function intFlag(opt: KindOptions, name: string, dflt: number, min: number, max: number): number {
  const s = opt.values.get(name);
  if (s === undefined) return dflt;
  const v = Number(s);
  if (!Number.isInteger(v) || v < min || v > max) {
    throw new PlotError(`--${name} expects an integer from ${min} to ${max}, got '${s}'`);
  }
  return v;
}

export function choiceFlag<T extends string>(opt: KindOptions, name: string, choices: readonly T[], dflt: T): T {
  const s = opt.values.get(name);
  if (s === undefined) return dflt;
  if (!(choices as readonly string[]).includes(s)) {
    throw new PlotError(`--${name} expects one of ${choices.join(', ')}, got '${s}'`);
  }
  return s as T;
}

/** "0,3,7" or "0-9,12" → sorted unique ion indices. */
export function ionList(text: string, flagName = 'ions'): number[] {
  const out = new Set<number>();
  for (const part of text.split(',')) {
    const p = part.trim();
    const m = /^(\d+)(?:-(\d+))?$/.exec(p);
    if (!m) throw new PlotError(`--${flagName} expects ion indices such as 0,3,7 or 0-9, got '${text}'`);
    const a = Number(m[1]), b = m[2] === undefined ? a : Number(m[2]);
    if (b < a || b - a > 1e6) throw new PlotError(`--${flagName}: bad range '${p}'`);
    for (let i = a; i <= b; i++) out.add(i);
  }
  return [...out].sort((x, y) => x - y);
}

/** Points a figure reads into memory at most before it thins them on its own (8 columns × 8 bytes each). */
export const MAX_POINTS_IN_MEMORY = 20_000_000;

/**
 * The --every to read with: the flag when given, else 1, or the smallest n that keeps the points
 * of `ionsWanted` (of all ions) under MAX_POINTS_IN_MEMORY. `note` says so for the subtitle.
 */
export function pointStride(run: RunFolder, opt: KindOptions, ionsWanted: number | null): { every: number; note: string } {
  if (opt.values.has('every')) return { every: intFlag(opt, 'every', 1, 1, 1e9), note: '' };
  const total = estimateTrajectoryRows(run.dir);
  const nIons = Math.max(1, run.ions.ion.length);
  const share = ionsWanted === null ? 1 : Math.min(1, ionsWanted / nIons);
  const rows = total * share;
  if (rows <= MAX_POINTS_IN_MEMORY) return { every: 1, note: '' };
  const every = Math.ceil(rows / MAX_POINTS_IN_MEMORY);
  return { every, note: `every ${every}th point read (≈${(rows / 1e6).toFixed(0)} M recorded; give --every 1 with fewer --ions to draw all)` };
}
