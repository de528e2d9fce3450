// Histograms per species: arrival time (end_time of detected ions, the TOF spectrum) and final
// kinetic energy. Bin width by the Freedman–Diaconis rule, h = 2·IQR·n^(−1/3) (Freedman & Diaconis,
// Z. Wahrscheinlichkeitstheorie verw. Gebiete 57, 1981), unless --bins is given.

import type { FateName, RunFolder } from '../../../sim/runfolder/index.js';
import { seriesColor } from '../../common/palette.js';
import { formatWithUnit } from '../../common/ticks.js';
import type { FigureSpec, LegendEntry } from '../figure.js';
import { PlotError, choiceFlag, intFlag, type KindOptions, type PlotKind } from '../kind.js';
import { figureTitle, footerText } from '../provenance.js';
import { tofResolution, TOF_RESOLUTION_DEFINITION } from '../../../sim/analysis/arrival.js';
import { speciesColors } from '../../common/species.js';

const FATE_CHOICES = ['detected', 'hit', 'missed', 'returned', 'alive', 'all'] as const;

function quantile(sorted: Float64Array, p: number): number {
  const x = p * (sorted.length - 1);
  const i = Math.floor(x), f = x - i;
  return i + 1 < sorted.length ? sorted[i] + f * (sorted[i + 1] - sorted[i]) : sorted[i];
}

/** Number of bins over [lo, hi] by Freedman–Diaconis, clamped to 5..200. */
export function freedmanDiaconisBins(values: Float64Array, lo: number, hi: number): number {
  const s = Float64Array.from(values).sort();
  const iqr = quantile(s, 0.75) - quantile(s, 0.25);
  const h = 2 * iqr * Math.pow(s.length, -1 / 3);
  if (!(h > 0) || !(hi > lo)) return 10;
  return Math.max(5, Math.min(200, Math.ceil((hi - lo) / h)));
}

/**
 * A round energy to subtract when the spread is under 1 % of the mean: the mean rounded to the
 * decade above the spread (20 002.4 eV with a 5 eV spread → 20 000 eV); 0 when no offset is needed.
 */
export function roundOffset(v: number[]): number {
  if (v.length === 0) return 0;
  let lo = Infinity, hi = -Infinity, m = 0;
  for (const x of v) { if (x < lo) lo = x; if (x > hi) hi = x; m += x; }
  m /= v.length;
  const span = Math.max(hi - lo, 1e-12);
  if (!(Math.abs(m) > 0) || span >= 0.01 * Math.abs(m)) return 0;
  const step = Math.pow(10, Math.ceil(Math.log10(span)) + 1);
  return Math.round(m / step) * step;
}

/** 20000 → "20 000" (thin groups of three, as SI writes large numbers). */
export function groupDigits(v: number): string {
  const [i, f] = String(Number(v.toPrecision(12))).split('.');
  return i.replace(/\B(?=(\d{3})+(?!\d))/g, ' ') + (f ? `.${f}` : '');
}

function meanSd(v: ArrayLike<number>): { mean: number; sd: number } {
  let m = 0;
  for (let i = 0; i < v.length; i++) m += v[i];
  m /= v.length;
  let s = 0;
  for (let i = 0; i < v.length; i++) s += (v[i] - m) * (v[i] - m);
  return { mean: m, sd: v.length > 1 ? Math.sqrt(s / (v.length - 1)) : 0 };
}

function buildHistogram(run: RunFolder, opt: KindOptions, what: 'arrival' | 'energy'): FigureSpec {
  const I = run.ions;
  const fate = choiceFlag(opt, 'fate', FATE_CHOICES, 'detected');
  const src = what === 'arrival' ? I.end_time : I.end_ke_ev;
  const byPop = new Map<number, number[]>();
  for (let r = 0; r < I.ion.length; r++) {
    if (fate !== 'all' && I.fate[r] !== (fate as FateName)) continue;
    const v = src[r];
    if (!Number.isFinite(v)) continue;
    const list = byPop.get(I.population[r]) ?? [];
    list.push(v);
    byPop.set(I.population[r], list);
  }
  // Energies of accelerated ions (20 keV ± a few eV): histogram the offset from a round energy so
  // the spread shows in eV instead of as 2.0000e4 on every tick.
  const offset = what === 'energy' ? roundOffset([...byPop.values()].flat()) : 0;
  if (offset !== 0) for (const l of byPop.values()) for (let k = 0; k < l.length; k++) l[k] -= offset;
  const all = Float64Array.from([...byPop.values()].flat());
  if (all.length === 0) {
    throw new PlotError(`${run.dir}: no ${fate === 'all' ? '' : fate + ' '}ions to histogram${fate !== 'all' ? ' (try --fate all)' : ''}`);
  }
  let lo = Infinity, hi = -Infinity;
  for (const v of all) { if (v < lo) lo = v; if (v > hi) hi = v; }
  if (!(hi > lo)) { const pad = Math.abs(lo) * 0.01 || 1e-12; lo -= pad; hi += pad; }
  const pops = [...byPop.keys()].sort((a, b) => a - b);
  const unit = what === 'arrival' ? 's' : 'eV';
  const overlay = opt.switches.has('overlay');
  // Well separated species (a TOF spectrum: ns-wide peaks µs apart) get one zoomed panel each;
  // a shared axis would squeeze every peak into a pixel.
  const spans = pops.map((p) => { const v = Float64Array.from(byPop.get(p)!).sort(); return { lo: v[0], hi: v[v.length - 1] }; });
  const widest = Math.max(...spans.map((r) => r.hi - r.lo));
  const separate = !overlay && pops.length > 1 && widest > 0 && (hi - lo) > 8 * widest;
  const legend: LegendEntry[] = [];
  const speciesColor = speciesColors(run.summary.species.map((s) => s.mz));
  const mzOf = (p: number) => { const r = I.population.indexOf(p); return r >= 0 ? Number(I.mz[r].toPrecision(6)) : NaN; };
  pops.forEach((p) => {
    const v = byPop.get(p)!;
    const { mean, sd } = meanSd(v);
    // TOF resolving power by the one definition of sim/analysis/arrival.ts (the same figure as
    // summary.json tof.species[].resolution_fwhm and the report's table, 4 significant digits there too).
    const r = what === 'arrival' ? tofResolution(v)?.resolution ?? null : null;
    const res = r !== null ? `, m/Δm ${Number(r.toPrecision(4))}` : '';
    legend.push({
      label: `m/z ${mzOf(p)}: n = ${v.length}, mean ${offset !== 0 ? `${groupDigits(offset)} eV + ` : ''}${formatWithUnit(mean, unit, 4)}, σ ${formatWithUnit(sd, unit, 3)}${res}`,
      color: speciesColor(mzOf(p)), mark: 'box',
    });
  });
  const label = what === 'arrival' ? 'arrival time' : offset !== 0 ? `final kinetic energy E − ${groupDigits(offset)} eV` : 'final kinetic energy';
  const fixedBins = opt.values.has('bins') ? intFlag(opt, 'bins', 40, 1, 2000) : 0;
  const groups = separate ? pops.map((p, i) => ({ pops: [p], colors: [i] })) : [{ pops, colors: pops.map((_, i) => i) }];
  const panels = groups.map((gr) => {
    const vals = Float64Array.from(gr.pops.flatMap((p) => byPop.get(p)!));
    let plo = Infinity, phi = -Infinity;
    for (const v of vals) { if (v < plo) plo = v; if (v > phi) phi = v; }
    if (!(phi > plo)) { const pad = Math.abs(plo) * 0.01 || 1e-12; plo -= pad; phi += pad; }
    const pad = 0.08 * (phi - plo);
    if (separate) { plo -= pad; phi += pad; }
    const nBins = fixedBins || freedmanDiaconisBins(vals, plo, phi);
    const width = (phi - plo) / nBins;
    const hists = gr.pops.map((p, k) => {
      const counts = new Float64Array(nBins);
      for (const x of byPop.get(p)!) counts[Math.min(nBins - 1, Math.floor((x - plo) / width))]++;
      return { counts, color: speciesColor(mzOf(p)) };
    });
    // Stacked by default: species that arrive together stay visible, and the top is the total.
    const base = hists.map(() => new Float64Array(nBins));
    if (!overlay) for (let i = 1; i < hists.length; i++) for (let b = 0; b < nBins; b++) base[i][b] = base[i - 1][b] + hists[i - 1].counts[b];
    let cmax = 0;
    hists.forEach((h, i) => { for (let b = 0; b < nBins; b++) cmax = Math.max(cmax, base[i][b] + h.counts[b]); });
    return {
      nBins, width,
      spec: {
        x: { label: separate ? `${label}, m/z ${mzOf(gr.pops[0])}` : label, unit, min: plo, max: phi },
        y: { label: 'ions per bin', unit: '', min: 0, max: cmax * 1.08, integer: true },
        draw: (ctx: Parameters<FigureSpec['panels'][number]['draw']>[0], g: Parameters<FigureSpec['panels'][number]['draw']>[1]) => {
          hists.forEach((h, i) => {
            if (overlay) {
              ctx.beginPath();
              ctx.moveTo(g.px(plo), g.py(0));
              for (let b = 0; b < nBins; b++) {
                ctx.lineTo(g.px(plo + b * width), g.py(h.counts[b]));
                ctx.lineTo(g.px(plo + (b + 1) * width), g.py(h.counts[b]));
              }
              ctx.lineTo(g.px(phi), g.py(0));
              ctx.closePath();
              ctx.globalAlpha = 0.25;
              ctx.fillStyle = h.color; ctx.fill();
              ctx.globalAlpha = 1;
              ctx.strokeStyle = h.color; ctx.lineWidth = 1.5; ctx.stroke();
              return;
            }
            ctx.fillStyle = h.color;
            for (let b = 0; b < nBins; b++) {
              if (h.counts[b] === 0) continue;
              const x0 = g.px(plo + b * width), x1 = g.px(plo + (b + 1) * width);
              const y0 = g.py(base[i][b]), y1 = g.py(base[i][b] + h.counts[b]);
              ctx.fillRect(x0, y1, Math.max(1, x1 - x0 - (x1 - x0 > 4 ? 1 : 0)), y0 - y1);
            }
          });
        },
      },
    };
  });
  const binText = separate
    ? `one panel per species (${panels.map((p) => formatWithUnit(p.width, unit, 2)).join(', ')} bins)`
    : `${panels[0].nBins} bins of ${formatWithUnit(panels[0].width, unit, 3)}`;
  return {
    title: figureTitle(run.summary, what === 'arrival' ? 'arrival-time histogram' : 'final-energy histogram'),
    subtitle: `${all.length.toLocaleString('en-US')} ${fate === 'all' ? '' : fate + ' '}ions, ${binText}${fixedBins ? '' : ' (Freedman–Diaconis)'}, ${overlay ? 'overlaid' : 'stacked'}${what === 'arrival' ? `; ${TOF_RESOLUTION_DEFINITION}` : ''}`,
    legend,
    rows: panels.length, cols: 1,
    panels: panels.map((p) => p.spec),
    footer: footerText(run.summary),
  };
}

const FLAGS = {
  fate: 'which ions: detected (default) | hit | missed | returned | alive | all',
  bins: 'number of bins (default: Freedman–Diaconis rule)',
};
const SWITCHES = { overlay: 'overlaid outlines per species instead of stacked bars' };

export const arrival: PlotKind = {
  name: 'arrival',
  describe: 'histogram of arrival times (end_time) per species, with σ and m/Δm',
  flags: FLAGS,
  switches: SWITCHES,
  build: async (run, opt) => buildHistogram(run, opt, 'arrival'),
};

export const energy: PlotKind = {
  name: 'energy',
  describe: 'histogram of final kinetic energies (end_ke_ev) per species',
  flags: FLAGS,
  switches: SWITCHES,
  build: async (run, opt) => buildHistogram(run, opt, 'energy'),
};
