// Time traces: stacked panels sharing one time axis (x, y, z, r, kinetic energy) for chosen ions or
// all recorded ones, drawn through per-pixel min/max decimation so 1e6 points per series draw in
// milliseconds. Optional RF period marks along the top of each panel.

import { readTrajectories, ionSegments, type RunFolder, type TrajectoryColumns } from '../../../sim/runfolder/index.js';
import { ATOMIC_MASS_UNIT, ELEMENTARY_CHARGE } from '../../../sim/units/constants.js';
import { INK_SOFT } from '../../common/palette.js';
import { speciesColors } from '../../common/species.js';
import { formatWithUnit } from '../../common/ticks.js';
import { extent } from '../axis.js';
import { Decimator } from '../decimate.js';
import type { Ctx, FigureSpec, LegendEntry, PanelGeom, PanelSpec } from '../figure.js';
import { PlotError, ionList, pointStride, type KindOptions, type PlotKind } from '../kind.js';
import { figureTitle, footerText } from '../provenance.js';
import { firstRfFrequency } from '../scene.js';

// `flat`: half the span of an axis whose values are all equal (ions on the axis: x = y = 0), on the
// scale of the quantity in an instrument, so such a panel reads ±0.1 mm and not ±1 m.
const QUANTITIES = {
  x: { label: 'x', unit: 'm', flat: 1e-4 },
  y: { label: 'y', unit: 'm', flat: 1e-4 },
  z: { label: 'z', unit: 'm', flat: 1e-4 },
  r: { label: 'r', unit: 'm', flat: 1e-4 },
  ke: { label: 'kinetic energy', unit: 'eV', flat: 0.1 },
  vx: { label: 'vx', unit: 'm/s', flat: 1 },
  vy: { label: 'vy', unit: 'm/s', flat: 1 },
  vz: { label: 'vz', unit: 'm/s', flat: 1 },
} as const;
type Quantity = keyof typeof QUANTITIES;

/** Ions drawn beyond which lines get thinner and translucent so the species drawn first show through. */
const MAX_PER_ION_COLOURS = 12;

/** One derived column over all points (r, kinetic energy) or a stored one. */
function column(q: Quantity, tr: TrajectoryColumns, massOf: (ion: number) => number): Float64Array {
  if (q === 'r') {
    const out = new Float64Array(tr.x.length);
    for (let i = 0; i < out.length; i++) out[i] = Math.hypot(tr.x[i], tr.y[i]);
    return out;
  }
  if (q === 'ke') {
    // Kinetic energy ½mv² in eV (non-relativistic; ion speeds here are ≪ c).
    const out = new Float64Array(tr.x.length);
    for (let i = 0; i < out.length; i++) {
      const v2 = tr.vx[i] * tr.vx[i] + tr.vy[i] * tr.vy[i] + tr.vz[i] * tr.vz[i];
      out[i] = (0.5 * massOf(tr.ion[i]) * v2) / ELEMENTARY_CHARGE;
    }
    return out;
  }
  return tr[q];
}

/** Ions per species drawn when --ions is not given. */
export const DEFAULT_PER_SPECIES = 3;

/** The first n ion ids of each population in the ions table, sorted. */
export function firstIonsPerSpecies(run: RunFolder, n: number): number[] {
  const seen = new Map<number, number>();
  const out: number[] = [];
  for (let r = 0; r < run.ions.ion.length; r++) {
    const p = run.ions.population[r];
    const k = seen.get(p) ?? 0;
    if (k >= n) continue;
    seen.set(p, k + 1);
    out.push(run.ions.ion[r]);
  }
  return out.sort((a, b) => a - b);
}

export interface TraceSeries { start: number; end: number; color: string }

/** Draw one decimated polyline per series. */
export function drawSeries(ctx: Ctx, g: PanelGeom, t: ArrayLike<number>, y: ArrayLike<number>, series: TraceSeries[], lineWidth: number, dec: Decimator): void {
  ctx.lineWidth = lineWidth;
  ctx.lineJoin = 'bevel'; // round joins cost more and are invisible at 1–2 px
  for (const s of series) {
    const n = dec.run(t, y, s.start, s.end, g.ax, g.bx);
    if (n === 0) continue;
    const xy = dec.xy;
    ctx.strokeStyle = s.color;
    ctx.beginPath();
    ctx.moveTo(xy[0], g.ay + g.by * xy[1]);
    for (let k = 1; k < n; k++) ctx.lineTo(xy[2 * k], g.ay + g.by * xy[2 * k + 1]);
    if (n === 1) ctx.lineTo(xy[0] + 0.5, g.ay + g.by * xy[1]);
    ctx.stroke();
  }
}

export const traces: PlotKind = {
  name: 'traces',
  describe: 'stacked time traces (x, y, z, r, kinetic energy) of chosen ions on one time axis',
  flags: {
    ions: `ions to draw, e.g. 0,3,7 or 0-9, or all (default: the first ${DEFAULT_PER_SPECIES} of each species)`,
    panels: 'quantities, top to bottom, from x,y,z,r,ke,vx,vy,vz (default x,y,z,ke)',
    every: 'read every n-th recorded point (default 1; thinned automatically above 2e7 points)',
  },
  switches: { 'rf-marks': 'tick marks at every RF period (of the first RF stage) along each panel top' },
  async build(run: RunFolder, opt: KindOptions): Promise<FigureSpec> {
    if (!run.hasTrajectories) throw new PlotError(`${run.dir}: no trajectories.arrow (run with record_every > 0 to draw traces)`);
    const panelsText = opt.values.get('panels') ?? 'x,y,z,ke';
    const panels = panelsText.split(',').map((s) => s.trim()) as Quantity[];
    for (const p of panels) {
      if (!(p in QUANTITIES)) throw new PlotError(`--panels: unknown quantity '${p}' (expected some of ${Object.keys(QUANTITIES).join(',')})`);
    }
    const ionsText = opt.values.get('ions');
    // Default: the first DEFAULT_PER_SPECIES ions of each species, so the lines stay readable.
    const wanted = ionsText === 'all' ? undefined : ionsText === undefined ? firstIonsPerSpecies(run, DEFAULT_PER_SPECIES) : ionList(ionsText);
    const { every, note } = pointStride(run, opt, wanted ? wanted.length : null);
    const tr = await readTrajectories(run.dir, { ions: wanted, everyNth: every });
    if (tr.t.length === 0) {
      throw new PlotError(`${run.dir}: no recorded points${wanted ? ` for ions ${ionsText}` : ''}`);
    }
    const rowOf = new Map<number, number>();
    run.ions.ion.forEach((ion, r) => rowOf.set(ion, r));
    const massOf = (ion: number): number => {
      const r = rowOf.get(ion);
      return r === undefined ? NaN : run.ions.mz[r] * Math.abs(run.ions.charge[r]) * ATOMIC_MASS_UNIT;
    };
    const segs = ionSegments(tr.ion);
    const perIon = segs.length <= MAX_PER_ION_COLOURS;
    // One colour per species, the same in every figure and the 3D view (render/common/species.ts);
    // the legend names the ions of each species.
    const speciesColor = speciesColors(run.summary.species.map((x) => x.mz));
    const ionsOf = new Map<number, number[]>();
    const series: TraceSeries[] = segs.map((s) => {
      const r = rowOf.get(s.ion);
      const mz = r === undefined ? NaN : run.ions.mz[r];
      const l = ionsOf.get(mz) ?? [];
      l.push(s.ion);
      ionsOf.set(mz, l);
      return { ...s, color: speciesColor(mz) };
    });
    const legend: LegendEntry[] = [...ionsOf.entries()].sort((a, b) => a[0] - b[0]).map(([mz, ions]) => ({
      label: `m/z ${fmt(mz)}: ${ions.length === 1 ? 'ion' : `${ions.length} ions`}${ions.length <= 4 ? ` ${ions.join(', ')}` : ''}`,
      color: speciesColor(mz), mark: 'line' as const,
    }));
    const [t0, t1] = extent([tr.t]);
    const rf = opt.switches.has('rf-marks') ? firstRfFrequency(run.summary) : undefined;
    if (opt.switches.has('rf-marks') && rf === undefined) {
      throw new PlotError(`--rf-marks: the scene in ${run.dir}/summary.json has no RF stage`);
    }
    // Marks every RF period, thinned to every n-th period (n = 1, 2, 5, 10, …) where they would be
    // closer than 4 px (plot width estimated from the page width; the legend says which n).
    let rfEvery = 1;
    if (rf !== undefined) {
      const pxPer = ((opt.width - 120) / Math.max(t1 - t0, 1e-30)) / rf;
      while (pxPer * rfEvery < 4) rfEvery = rfEvery === 1 ? 2 : rfEvery === 2 ? 5 : rfEvery * 2;
      const every = rfEvery === 1 ? '' : ` (mark every ${rfEvery} periods)`;
      legend.push({ label: `RF period ${formatWithUnit(1 / rf, 's')}${every}`, color: INK_SOFT, mark: 'line' });
    }
    const dec = new Decimator();
    const lineWidth = perIon ? 1.3 : 0.8;
    // Many ions: translucent lines so the populations drawn first still show through.
    const alpha = perIon ? 1 : 0.6;
    const specs: PanelSpec[] = panels.map((q) => {
      const y = column(q, tr, massOf);
      let [lo, hi] = extent([y]);
      if (lo === hi) { lo -= QUANTITIES[q].flat; hi += QUANTITIES[q].flat; }
      return {
        x: { label: 'time', unit: 's', min: t0, max: t1, nice: false },
        y: { label: QUANTITIES[q].label, unit: QUANTITIES[q].unit, min: lo, max: hi },
        draw: (ctx, g) => { ctx.globalAlpha = alpha; drawSeries(ctx, g, tr.t, y, series, lineWidth, dec); ctx.globalAlpha = 1; },
        overlay: rf === undefined ? undefined : (ctx, g) => {
          const period = 1 / rf;
          ctx.strokeStyle = INK_SOFT;
          ctx.lineWidth = 1.2;
          ctx.beginPath();
          const k0 = Math.ceil(g.x.min / period / rfEvery) * rfEvery;
          for (let k = k0; k * period <= g.x.max; k += rfEvery) {
            const X = Math.round(g.ax + g.bx * k * period) + 0.5;
            ctx.moveTo(X, g.top); ctx.lineTo(X, g.top + 6);
          }
          ctx.stroke();
        },
      };
    });
    const total = tr.t.length;
    return {
      title: figureTitle(run.summary, 'time traces'),
      subtitle: `${segs.length} ion${segs.length === 1 ? '' : 's'}, ${total.toLocaleString('en-US')} recorded points${every > 1 ? ` (${note || `every ${every}th read`})` : ''}`,
      legend,
      panels: specs,
      rows: specs.length,
      cols: 1,
      sharedX: true,
      footer: footerText(run.summary),
    };
  },
};

function fmt(mz: number): string {
  return Number.isFinite(mz) ? String(Number(mz.toPrecision(6))) : '?';
}
