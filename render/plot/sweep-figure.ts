// Figures of a sweep folder (`iontrail sweep`): chosen columns of sweep.csv against the first varied
// key, one stacked panel per column — e.g. the trap's capacity curve (secular-frequency shift and
// cloud size against stored charge) or transmission against a DC voltage. A two-key sweep draws one
// curve per value of the other key (a peak per DC value), never one line through every point.

import { readFileSync, existsSync } from 'node:fs';
import { join } from 'node:path';
import { INK, seriesColor } from '../common/palette.js';
import { checkOutputFolder, imageFormat, writeFileAtomic } from '../common/output.js';
import { renderFigure, type FigureSpec } from './figure.js';
import { PlotError } from './kind.js';

export interface SweepTable {
  dir: string;
  columns: string[];
  rows: number[][];
  summary: Record<string, any>;
}

export function readSweepFolder(dir: string): SweepTable {
  const csv = join(dir, 'sweep.csv');
  if (!existsSync(csv)) throw new PlotError(`${dir}: not a sweep folder (no sweep.csv)`);
  const lines = readFileSync(csv, 'utf8').trim().split('\n');
  const columns = lines[0].split(',');
  const rows = lines.slice(1).map((l) => l.split(',').map((v) => (v === '' ? NaN : Number(v))));
  let summary: Record<string, any> = {};
  try { summary = JSON.parse(readFileSync(join(dir, 'summary.json'), 'utf8')); } catch {
    throw new PlotError(`${dir}: summary.json of the sweep is missing or not JSON`);
  }
  return { dir, columns, rows, summary };
}

/** Axis unit from a column name: SI figures carry it in their name (_m, _hz, _s, _v). */
function unitOf(col: string, summary: Record<string, any>): { label: string; unit: string } {
  const u = summary.sweep?.units?.[col];
  // The trade writes the mass-to-charge axis m/z (unit Th, left unwritten as is usual).
  if (u) return { label: col === 'mz' ? 'm/z' : col, unit: u === 'Th' ? '' : u };
  const m = /_(m|hz|s|v|ev)$/.exec(col);
  const units: Record<string, string> = { m: 'm', hz: 'Hz', s: 's', v: 'V', ev: 'eV' };
  const label = col.replace(/^space_charge\.|^cooling\.|^scan\./, '').replace(/_(m|hz|s|v|ev)$/, '').replace(/_/g, ' ');
  // Relative shifts (summary.json space_charge.frequency_shift_*: f/f_single − 1) are fractions.
  if (/frequency_shift/.test(col)) return { label: `${label} (fraction, f/f₁ − 1)`, unit: '' };
  if (/^transmission$|\.transmission$/.test(col)) return { label: `${label} (fraction detected)`, unit: '' };
  return { label, unit: m ? units[m[1]] : '' };
}

/** One curve of a panel: the rows sharing the values of the varied keys other than x. */
export interface SweepSeries { label: string; rows: number[][] }

/**
 * Rows grouped by the other varied keys (one series when x is the only varied key). An x that is a
 * result column (the real charge of a weight sweep) follows the first varied key, so that key
 * draws along the curve rather than splitting it into one-point curves.
 */
export function sweepSeries(t: SweepTable, x: string): SweepSeries[] {
  const keys: string[] = Array.isArray(t.summary.sweep?.keys) ? t.summary.sweep.keys : [];
  const others = (keys.includes(x) ? keys.filter((k) => k !== x) : keys.slice(1)).filter((k) => t.columns.includes(k));
  if (others.length === 0) return [{ label: '', rows: t.rows }];
  const idx = others.map((k) => t.columns.indexOf(k));
  const groups = new Map<string, SweepSeries>();
  for (const r of t.rows) {
    const id = idx.map((i) => r[i]).join(',');
    let g = groups.get(id);
    if (!g) {
      const label = others.map((k, j) => {
        const u = unitOf(k, t.summary).unit;
        return `${k} = ${Number(r[idx[j]].toPrecision(6))}${u ? ` ${u}` : ''}`;
      }).join(', ');
      g = { label, rows: [] };
      groups.set(id, g);
    }
    g.rows.push(r);
  }
  return [...groups.values()];
}

/**
 * Several one-key sweep folders of the same key (two designs side by side, e.g. a filter with and
 * without its prefilter) as one table whose curves are the folders, labelled by their scene names.
 */
export function joinSweeps(ts: SweepTable[]): { table: SweepTable; series: (x: string) => SweepSeries[] } {
  const t = ts[0];
  for (const o of ts.slice(1)) {
    if (o.columns.join(',') !== t.columns.join(',')) throw new PlotError(`${o.dir}: its sweep.csv columns differ from those of ${t.dir}; compare sweeps of the same key`);
    if ((o.summary.sweep?.keys ?? []).length > 1) throw new PlotError(`${o.dir}: a sweep of two keys; compare one-key sweeps`);
  }
  if ((t.summary.sweep?.keys ?? []).length > 1) throw new PlotError(`${t.dir}: a sweep of two keys; compare one-key sweeps`);
  const names = ts.map((o) => String(o.summary.scene_name ?? o.dir));
  const files = ts.map((o) => String(o.summary.provenance?.scene_file ?? '?')).join(', ');
  const table: SweepTable = {
    ...t, rows: ts.flatMap((o) => o.rows),
    summary: { ...t.summary, scene_name: names.join(' vs '), folders: ts.length, provenance: { ...t.summary.provenance, scene_file: files } },
  };
  return { table, series: () => ts.map((o, j) => ({ label: names[j], rows: o.rows })) };
}

export function sweepFigure(t: SweepTable, yCols: string[], xCol?: string, seriesOf: (x: string) => SweepSeries[] = (x) => sweepSeries(t, x)): FigureSpec {
  const x = xCol ?? t.columns[0];
  const xi = t.columns.indexOf(x);
  if (xi < 0) throw new PlotError(`--x '${x}' is not a column of sweep.csv (columns: ${t.columns.join(', ')})`);
  const ys = yCols.length > 0 ? yCols : ['transmission'];
  const series = seriesOf(x);
  const grouped = series.length > 1;
  const panels = ys.map((col, k) => {
    const yi = t.columns.indexOf(col);
    if (yi < 0) throw new PlotError(`--y '${col}' is not a column of sweep.csv (columns: ${t.columns.join(', ')})`);
    // A column with its interval beside it (transmission_low, transmission_high: the 95 % Wilson
    // score interval) is drawn over a band of that interval, per curve.
    const li = t.columns.indexOf(`${col}_low`), hiCol = t.columns.indexOf(`${col}_high`);
    const curves = series.map((s, j) => ({
      color: seriesColor(grouped ? j : k),
      pts: s.rows.map((r) => [r[xi], r[yi]] as [number, number]).filter(([a, b]) => Number.isFinite(a) && Number.isFinite(b)).sort((p, q) => p[0] - q[0]),
      band: li >= 0 && hiCol >= 0
        ? s.rows.map((r) => [r[xi], r[li], r[hiCol]] as [number, number, number]).filter((v) => v.every(Number.isFinite)).sort((p, q) => p[0] - q[0])
        : [],
    }));
    if (curves.every((c) => c.pts.length === 0)) throw new PlotError(`${t.dir}: column '${col}' has no values`);
    let lo = Infinity, hi = -Infinity, xlo = Infinity, xhi = -Infinity;
    for (const c of curves) for (const [a, b] of c.pts) { lo = Math.min(lo, b); hi = Math.max(hi, b); xlo = Math.min(xlo, a); xhi = Math.max(xhi, a); }
    for (const c of curves) for (const [, l, h] of c.band) { lo = Math.min(lo, l); hi = Math.max(hi, h); }
    if (!(hi > lo)) { const p = Math.abs(lo) * 0.05 || 1; lo -= p; hi += p; }
    if (!(xhi > xlo)) { xlo -= 1; xhi += 1; }
    const pad = 0.06 * (hi - lo);
    const yu = unitOf(col, t.summary), xu = unitOf(x, t.summary);
    return {
      x: { label: xu.label, unit: xu.unit, min: xlo, max: xhi },
      // Non-negative figures (transmission, widths) keep zero as the floor of the axis.
      y: { label: yu.label, unit: yu.unit, min: lo >= 0 ? Math.max(0, lo - pad) : lo - pad, max: hi + pad },
      draw: (ctx: any, g: any) => {
        for (const { color, pts, band } of curves) {
          if (band.length > 1) {
            ctx.fillStyle = color; ctx.globalAlpha = 0.2;
            ctx.beginPath();
            band.forEach(([a, , h], i) => (i === 0 ? ctx.moveTo(g.px(a), g.py(h)) : ctx.lineTo(g.px(a), g.py(h))));
            for (let i = band.length - 1; i >= 0; i--) ctx.lineTo(g.px(band[i][0]), g.py(band[i][1]));
            ctx.closePath(); ctx.fill();
            ctx.globalAlpha = 1;
          }
          ctx.strokeStyle = color; ctx.lineWidth = 2;
          ctx.beginPath();
          pts.forEach(([a, b], i) => (i === 0 ? ctx.moveTo(g.px(a), g.py(b)) : ctx.lineTo(g.px(a), g.py(b))));
          ctx.stroke();
          ctx.fillStyle = color;
          const r = pts.length > 60 ? 2 : 3.5; // dense sweeps: dots that do not merge into a band
          for (const [a, b] of pts) { ctx.beginPath(); ctx.arc(g.px(a), g.py(b), r, 0, 2 * Math.PI); ctx.fill(); }
        }
      },
    };
  });
  const name = t.summary.scene_name ?? 'sweep';
  const p = t.summary.provenance ?? {};
  const banded = (c: string) => t.columns.includes(`${c}_low`) && t.columns.includes(`${c}_high`);
  const band = (c: string, color: string) => ({ label: `${c}: 95 % Wilson score interval`, color, fill: `${color}33`, mark: 'region' as const });
  const legend = grouped
    ? [...series.map((s, j) => ({ label: s.label, color: seriesColor(j), mark: 'line' as const })),
      ...ys.filter(banded).map((c) => ({ ...band(c, INK), label: `${c}: band = 95 % Wilson score interval` }))]
    : ys.flatMap((c, k) => {
      const line = { label: c, color: seriesColor(k), mark: 'line' as const };
      return banded(c) ? [line, band(c, seriesColor(k))] : [line];
    });
  return {
    title: `${name} — sweep of ${(t.summary.sweep?.keys ?? [x]).map((k: string) => (k === 'mz' ? 'm/z' : k)).join(' × ')}`,
    subtitle: `${t.summary.folders ? `${t.summary.folders} sweeps, ` : ''}${t.rows.length} points × ${t.summary.sweep?.ions_per_point ?? '?'} ions; method ${p.method ?? '?'}${grouped ? `; ${series.length} curves of ${Math.max(...series.map((s) => s.rows.length))} points` : ''}`,
    legend, panels, rows: panels.length, cols: 1, sharedX: true,
    // Version, seed and scene only (no start time, no folder name): a merged sweep's figure has the
    // unsharded sweep's bytes.
    footer: `iontrail ${p.tool_version ?? '?'} · seed ${p.seed ?? '?'} · scene ${p.scene_file ?? '?'}`,
  };
}

export async function plotSweep(dir: string | string[], out: string, yCols: string[], xCol?: string, width = 1100, height?: number): Promise<{ bytes: number }> {
  const format = imageFormat(out);
  checkOutputFolder(out);
  const dirs = typeof dir === 'string' ? [dir] : dir;
  const joined = dirs.length > 1 ? joinSweeps(dirs.map(readSweepFolder)) : undefined;
  const spec = joined ? sweepFigure(joined.table, yCols, xCol, joined.series) : sweepFigure(readSweepFolder(dirs[0]), yCols, xCol);
  const h = height ?? 180 + 260 * spec.panels.length;
  const data = await renderFigure(spec, { width, height: h, format });
  writeFileAtomic(out, data);
  return { bytes: data.byteLength };
}
