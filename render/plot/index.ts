// 2D figures of a run folder: `plotRun(dir, kind, options, out)` reads the folder, builds the
// figure of the named kind and writes PNG or SVG atomically. Kinds are listed in KINDS.
//
//   traces     stacked time traces (x, y, z, r, kinetic energy) on one time axis
//   stability  first Mathieu stability region with the scene's species and the scan line
//   phase      transverse phase space x–vx and y–vy
//   xy         x–y projection of the ensemble
//   cooling    ensemble mean kinetic energy (log) with the fitted τ, and cloud size, vs time
//   arrival    histogram of arrival times of detected ions, per species
//   energy     histogram of final kinetic energies, per species
//   radial     radial density in an RF multipole against exp(−V*(r)/kT)

import { readRunFolder } from '../../sim/runfolder/index.js';
import { checkOutputFolder, imageFormat, writeFileAtomic } from '../common/output.js';
import { renderFigure, type FigureSpec } from './figure.js';
import { PlotError, type KindOptions, type PlotKind } from './kind.js';
import { traces } from './kinds/traces.js';
import { stability } from './kinds/stability.js';
import { phase, xy } from './kinds/scatter.js';
import { cooling } from './kinds/cooling.js';
import { arrival, energy } from './kinds/histogram.js';
import { radial } from './kinds/radial.js';

export { PlotError, type PlotKind, type KindOptions } from './kind.js';
export { renderFigure, type FigureSpec } from './figure.js';

export const KINDS: readonly PlotKind[] = [traces, stability, phase, xy, cooling, arrival, energy, radial];

export function kindByName(name: string): PlotKind | undefined {
  return KINDS.find((k) => k.name === name);
}

export interface PlotRequest {
  kind: string;
  out: string;
  width?: number;
  height?: number;
  values?: Map<string, string>;
  switches?: Set<string>;
}

/** Build the figure of one kind from a run folder (no file written). */
export async function buildFigure(dir: string, req: PlotRequest): Promise<{ spec: FigureSpec; width: number; height: number }> {
  const kind = kindByName(req.kind);
  if (!kind) throw new PlotError(`unknown kind '${req.kind}' (expected one of ${KINDS.map((k) => k.name).join(', ')})`);
  const width = req.width ?? 1100;
  const height = req.height ?? defaultHeight(req.kind);
  const run = await readRunFolder(dir);
  const opt: KindOptions = { values: req.values ?? new Map(), switches: req.switches ?? new Set(), width, height };
  return { spec: await kind.build(run, opt), width, height };
}

/** Read a run folder, draw one figure, write it (PNG or SVG by extension) atomically. */
export async function plotRun(dir: string, req: PlotRequest): Promise<{ bytes: number }> {
  const format = imageFormat(req.out);
  checkOutputFolder(req.out); // fail before the work, not after
  const { spec, width, height } = await buildFigure(dir, req);
  const data = await renderFigure(spec, { width, height, format });
  writeFileAtomic(req.out, data);
  return { bytes: data.byteLength };
}

function defaultHeight(kind: string): number {
  return kind === 'traces' ? 900 : kind === 'stability' || kind === 'xy' ? 760 : kind === 'cooling' ? 800 : 620;
}
