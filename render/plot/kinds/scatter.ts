// Ensemble scatter figures: transverse phase space (x–vx, y–vy) and the x–y projection, from all
// recorded trajectory points or from the ions' start or end states. Large ensembles are drawn as a
// density (2D histogram of 3 px cells, log-scaled counts) instead of one mark per point.

import { readTrajectories, type RunFolder } from '../../../sim/runfolder/index.js';
import { densityRgb, seriesColor } from '../../common/palette.js';
import { extent, padded } from '../axis.js';
import type { Ctx, FigureSpec, LegendEntry, PanelGeom, PanelSpec } from '../figure.js';
import { PlotError, choiceFlag, intFlag, pointStride, type KindOptions, type PlotKind } from '../kind.js';
import { figureTitle, footerText } from '../provenance.js';
import { rfStages, sceneStages, stageExtent } from '../scene.js';
import { speciesColors } from '../../common/species.js';

const SOURCES = ['points', 'start', 'end'] as const;
const STYLES = ['auto', 'scatter', 'density'] as const;
/** Above this many points `auto` switches from marks to a density. */
const DENSITY_ABOVE = 20000;
const CELL = 3;

interface Cloud {
  x: Float64Array; y: Float64Array; vx: Float64Array; vy: Float64Array;
  /** Population of each point (colour). */
  pop: Int32Array;
  what: string;
}

async function loadCloud(run: RunFolder, opt: KindOptions): Promise<Cloud> {
  const source = choiceFlag(opt, 'source', SOURCES, run.hasTrajectories ? 'points' : 'end');
  const I = run.ions;
  if (source === 'start') return { x: I.x0, y: I.y0, vx: I.vx0, vy: I.vy0, pop: I.population, what: 'ion start states' };
  if (source === 'end') return { x: I.end_x, y: I.end_y, vx: I.end_vx, vy: I.end_vy, pop: I.population, what: 'ion end states' };
  if (!run.hasTrajectories) throw new PlotError(`--source points: ${run.dir} has no trajectories.arrow (try --source end)`);
  const { every, note } = pointStride(run, opt, null);
  // Points inside one stage only (default: the first RF stage), so that the drift after a filter
  // does not stretch the axes; --stage all keeps every point.
  const stageText = opt.values.get('stage');
  let zRange: { type: string; zStart: number; zEnd: number } | undefined;
  let stageIndex = -1;
  if (stageText !== 'all') {
    if (stageText !== undefined) {
      stageIndex = intFlag(opt, 'stage', 0, 0, 1000);
      if (stageIndex >= sceneStages(run.summary).length) throw new PlotError(`--stage ${stageIndex}: the scene has ${sceneStages(run.summary).length} stages (or give --stage all)`);
    } else stageIndex = rfStages(run.summary)[0]?.index ?? -1;
    zRange = stageIndex >= 0 ? stageExtent(run.summary, stageIndex) : undefined;
  }
  const tr = await readTrajectories(run.dir, { everyNth: every });
  const rowOf = new Map<number, number>();
  I.ion.forEach((ion, r) => rowOf.set(ion, r));
  let keep = tr.ion.length;
  let idx: Int32Array | null = null;
  if (zRange) {
    idx = new Int32Array(tr.ion.length);
    keep = 0;
    for (let k = 0; k < tr.z.length; k++) if (tr.z[k] >= zRange.zStart && tr.z[k] <= zRange.zEnd) idx[keep++] = k;
  }
  const pick = (a: Float64Array) => (idx === null ? a : Float64Array.from(idx.subarray(0, keep), (k) => a[k]));
  const pop = new Int32Array(keep);
  for (let j = 0; j < keep; j++) pop[j] = I.population[rowOf.get(tr.ion[idx === null ? j : idx[j]]) ?? 0] ?? 0;
  const where = zRange ? ` inside stage ${stageIndex} (${zRange.type})` : '';
  return { x: pick(tr.x), y: pick(tr.y), vx: pick(tr.vx), vy: pick(tr.vy), pop, what: `recorded points${where}${every > 1 ? `, ${note || `every ${every}th`}` : ''}` };
}

function populationLegend(run: RunFolder, pops: Int32Array): { legend: LegendEntry[]; colorOf: Map<number, string> } {
  const present = [...new Set(pops)].sort((a, b) => a - b);
  const colorOf = new Map<number, string>();
  const legend: LegendEntry[] = [];
  const speciesColor = speciesColors(run.summary.species.map((s) => s.mz));
  present.forEach((p) => {
    const r = run.ions.population.indexOf(p);
    const mz = r >= 0 ? run.ions.mz[r] : NaN;
    colorOf.set(p, speciesColor(mz));
    legend.push({ label: `m/z ${Number.isFinite(mz) ? Number(mz.toPrecision(6)) : '?'}`, color: speciesColor(mz), mark: 'point' });
  });
  return { legend, colorOf };
}

function drawMarks(ctx: Ctx, g: PanelGeom, xs: ArrayLike<number>, ys: ArrayLike<number>, pop: Int32Array, colorOf: Map<number, string>): void {
  const n = xs.length;
  const size = n > 5000 ? 1.5 : n > 500 ? 2.5 : 4;
  ctx.globalAlpha = n > 5000 ? 0.5 : 0.85;
  // One pass per population so each colour is set once.
  for (const [p, color] of colorOf) {
    ctx.fillStyle = color;
    for (let i = 0; i < n; i++) {
      if (pop[i] !== p) continue;
      const X = g.ax + g.bx * xs[i], Y = g.ay + g.by * ys[i];
      if (Number.isFinite(X) && Number.isFinite(Y)) ctx.fillRect(X - size / 2, Y - size / 2, size, size);
    }
  }
  ctx.globalAlpha = 1;
}

function drawDensity(ctx: Ctx, g: PanelGeom, xs: ArrayLike<number>, ys: ArrayLike<number>): void {
  const nx = Math.max(1, Math.ceil(g.width / CELL)), ny = Math.max(1, Math.ceil(g.height / CELL));
  const counts = new Uint32Array(nx * ny);
  let max = 0;
  for (let i = 0; i < xs.length; i++) {
    const cx = Math.floor((g.ax + g.bx * xs[i] - g.left) / CELL), cy = Math.floor((g.ay + g.by * ys[i] - g.top) / CELL);
    if (!(cx >= 0 && cx < nx && cy >= 0 && cy < ny)) continue;
    const c = ++counts[cy * nx + cx];
    if (c > max) max = c;
  }
  const lmax = Math.log1p(max);
  for (let cy = 0; cy < ny; cy++) {
    for (let cx = 0; cx < nx; cx++) {
      const c = counts[cy * nx + cx];
      if (c === 0) continue;
      // Log scale so sparse halo and dense core are both visible; the lightest non-empty shade is kept visible.
      const [r, gg, b] = densityRgb(0.15 + 0.85 * Math.log1p(c) / lmax);
      ctx.fillStyle = `rgb(${r},${gg},${b})`;
      ctx.fillRect(g.left + cx * CELL, g.top + cy * CELL, CELL, CELL);
    }
  }
}

function cloudPanel(xs: Float64Array, ys: Float64Array, xq: [string, string], yq: [string, string], density: boolean,
  pop: Int32Array, colorOf: Map<number, string>, equal: boolean): PanelSpec {
  let xr = padded(extent([xs])), yr = padded(extent([ys]));
  if (equal) {
    // Same range on both axes, centred on each, so that the projection is not distorted.
    const half = Math.max(xr[1] - xr[0], yr[1] - yr[0]) / 2;
    const cx = (xr[0] + xr[1]) / 2, cy = (yr[0] + yr[1]) / 2;
    xr = [cx - half, cx + half]; yr = [cy - half, cy + half];
  }
  return {
    x: { label: xq[0], unit: xq[1], min: xr[0], max: xr[1] },
    y: { label: yq[0], unit: yq[1], min: yr[0], max: yr[1] },
    equalAspect: equal,
    draw: (ctx, g) => (density ? drawDensity(ctx, g, xs, ys) : drawMarks(ctx, g, xs, ys, pop, colorOf)),
  };
}

const COMMON_FLAGS = {
  source: 'points (all recorded points, default when recorded) | start | end (ion states)',
  style: 'auto (density above 20,000 points) | scatter | density',
  every: 'with --source points: read every n-th recorded point',
  stage: 'with --source points: only points inside this scene stage (default: the first RF stage), or all',
};

async function build(run: RunFolder, opt: KindOptions, kind: 'phase' | 'xy'): Promise<FigureSpec> {
  const cloud = await loadCloud(run, opt);
  const n = cloud.x.length;
  if (n === 0) throw new PlotError(`${run.dir}: no ${cloud.what} to draw`);
  const style = choiceFlag(opt, 'style', STYLES, 'auto');
  const density = style === 'density' || (style === 'auto' && n > DENSITY_ABOVE);
  const { legend, colorOf } = populationLegend(run, cloud.pop);
  const shown: LegendEntry[] = density
    ? [{ label: `points per 3 px cell, log scale: 1 (light) to most (dark); ${n.toLocaleString('en-US')} points, all populations`, color: '#2171B5', mark: 'ramp' }]
    : legend;
  const panels = kind === 'phase'
    ? [
      cloudPanel(cloud.x, cloud.vx, ['x', 'm'], ['vx', 'm/s'], density, cloud.pop, colorOf, false),
      cloudPanel(cloud.y, cloud.vy, ['y', 'm'], ['vy', 'm/s'], density, cloud.pop, colorOf, false),
    ]
    : [cloudPanel(cloud.x, cloud.y, ['x', 'm'], ['y', 'm'], density, cloud.pop, colorOf, true)];
  return {
    title: figureTitle(run.summary, kind === 'phase' ? 'transverse phase space' : 'x–y projection'),
    subtitle: `${n.toLocaleString('en-US')} ${cloud.what}`,
    legend: shown,
    panels,
    rows: 1,
    cols: panels.length,
    footer: footerText(run.summary),
  };
}

export const phase: PlotKind = {
  name: 'phase',
  describe: 'transverse phase space x–vx and y–vy of the ensemble (scatter, or density when large)',
  flags: COMMON_FLAGS,
  build: (run, opt) => build(run, opt, 'phase'),
};

export const xy: PlotKind = {
  name: 'xy',
  describe: 'x–y projection of the ensemble, equal scales (scatter, or density when large)',
  flags: COMMON_FLAGS,
  build: (run, opt) => build(run, opt, 'xy'),
};
