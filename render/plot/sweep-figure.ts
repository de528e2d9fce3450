// Figures of a sweep folder (`iontrail sweep`): chosen columns of sweep.csv against the first varied
// key, one stacked panel per column — e.g. the trap's capacity curve (secular-frequency shift and
// cloud size against stored charge) or transmission against a DC voltage.

import { readFileSync, existsSync } from 'node:fs';
import { join, basename, resolve } from 'node:path';
import { seriesColor } from '../common/palette.js';
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
  if (u) return { label: col, unit: u === 'Th' ? '' : u };
  const m = /_(m|hz|s|v|ev)$/.exec(col);
  const units: Record<string, string> = { m: 'm', hz: 'Hz', s: 's', v: 'V', ev: 'eV' };
  const label = col.replace(/^space_charge\.|^cooling\.|^scan\./, '').replace(/_(m|hz|s|v|ev)$/, '').replace(/_/g, ' ');
  return { label, unit: m ? units[m[1]] : '' };
}

export function sweepFigure(t: SweepTable, yCols: string[], xCol?: string): FigureSpec {
  const x = xCol ?? t.columns[0];
  const xi = t.columns.indexOf(x);
  if (xi < 0) throw new PlotError(`--x '${x}' is not a column of sweep.csv (columns: ${t.columns.join(', ')})`);
  const ys = yCols.length > 0 ? yCols : ['transmission'];
  const panels = ys.map((col, k) => {
    const yi = t.columns.indexOf(col);
    if (yi < 0) throw new PlotError(`--y '${col}' is not a column of sweep.csv (columns: ${t.columns.join(', ')})`);
    const pts = t.rows.map((r) => [r[xi], r[yi]] as [number, number]).filter(([a, b]) => Number.isFinite(a) && Number.isFinite(b));
    if (pts.length === 0) throw new PlotError(`${t.dir}: column '${col}' has no values`);
    // A column with its interval beside it (transmission_low, transmission_high: the 95 % Wilson
    // score interval) is drawn over a band of that interval.
    const li = t.columns.indexOf(`${col}_low`), hiCol = t.columns.indexOf(`${col}_high`);
    const band = li >= 0 && hiCol >= 0
      ? t.rows.map((r) => [r[xi], r[li], r[hiCol]] as [number, number, number]).filter((v) => v.every(Number.isFinite)).sort((p, q) => p[0] - q[0])
      : [];
    let lo = Infinity, hi = -Infinity, xlo = Infinity, xhi = -Infinity;
    for (const [a, b] of pts) { lo = Math.min(lo, b); hi = Math.max(hi, b); xlo = Math.min(xlo, a); xhi = Math.max(xhi, a); }
    for (const [, l, h] of band) { lo = Math.min(lo, l); hi = Math.max(hi, h); }
    if (!(hi > lo)) { const p = Math.abs(lo) * 0.05 || 1; lo -= p; hi += p; }
    if (!(xhi > xlo)) { xlo -= 1; xhi += 1; }
    const pad = 0.06 * (hi - lo);
    const color = seriesColor(k);
    const yu = unitOf(col, t.summary), xu = unitOf(x, t.summary);
    return {
      x: { label: xu.label, unit: xu.unit, min: xlo, max: xhi },
      // Non-negative figures (transmission, widths) keep zero as the floor of the axis.
      y: { label: yu.label, unit: yu.unit, min: lo >= 0 ? Math.max(0, lo - pad) : lo - pad, max: hi + pad },
      draw: (ctx: any, g: any) => {
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
        for (const [a, b] of pts) { ctx.beginPath(); ctx.arc(g.px(a), g.py(b), 3.5, 0, 2 * Math.PI); ctx.fill(); }
      },
    };
  });
  const name = t.summary.scene_name ?? 'sweep';
  const p = t.summary.provenance ?? {};
  return {
    title: `${name} — sweep of ${t.summary.sweep?.keys?.join(' × ') ?? x}`,
    subtitle: `${t.rows.length} points × ${t.summary.sweep?.ions_per_point ?? '?'} ions; method ${p.method ?? '?'}`,
    legend: ys.flatMap((c, k) => {
      const line = { label: c, color: seriesColor(k), mark: 'line' as const };
      const banded = t.columns.includes(`${c}_low`) && t.columns.includes(`${c}_high`);
      return banded ? [line, { label: `${c}: 95 % Wilson score interval`, color: seriesColor(k), fill: `${seriesColor(k)}33`, mark: 'region' as const }] : [line];
    }),
    panels, rows: panels.length, cols: 1, sharedX: true,
    footer: `iontrail ${p.tool_version ?? '?'} · seed ${p.seed ?? '?'} · scene ${p.scene_file ?? '?'} · sweep ${basename(resolve(t.dir))}${p.started_at ? ` · started ${p.started_at}` : ''}`,
  };
}

export async function plotSweep(dir: string, out: string, yCols: string[], xCol?: string, width = 1100, height?: number): Promise<{ bytes: number }> {
  const format = imageFormat(out);
  checkOutputFolder(out);
  const t = readSweepFolder(dir);
  const spec = sweepFigure(t, yCols, xCol);
  const h = height ?? 180 + 260 * spec.panels.length;
  const data = await renderFigure(spec, { width, height: h, format });
  writeFileAtomic(out, data);
  return { bytes: data.byteLength };
}
