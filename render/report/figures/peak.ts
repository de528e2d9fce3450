// Peak shape of a quadrupole filter: transmission against m/z from an m/z sweep of the scene
// (sim/sweeps/sweep.ts), with the peak figures the sweep reports (centre, FWHM, m/Δm at 50 % and
// 10 % height, transmission at the peak).

import type { RunSummary } from '../../../sim/runfolder/index.js';
import { seriesColor, INK_SOFT } from '../../common/palette.js';
import type { FigureSpec } from '../../plot/figure.js';
import { figureTitle, footerText } from '../../plot/provenance.js';

export interface SweepPeak { mz: number; fwhm_mz: number | null; resolution_50: number | null; resolution_10: number | null; transmission: number }

/** What the report needs of a sweep: the curve and its peak. */
export interface SweepCurve {
  mz: number[];
  transmission: number[];
  /** Ions per point. */
  ions: number;
  peak: SweepPeak | null;
}

const fmt = (v: number | null, d = 4): string => (v === null ? '—' : String(Number(v.toPrecision(d))));

export function peakShapeFigure(sweep: SweepCurve, summary: RunSummary, runDir: string): FigureSpec | null {
  if (sweep.mz.length < 2) return null;
  const lo = Math.min(...sweep.mz), hi = Math.max(...sweep.mz);
  const tmax = Math.max(0.05, ...sweep.transmission);
  const p = sweep.peak;
  const c = seriesColor(0);
  return {
    title: figureTitle(summary, 'peak shape (m/z sweep)'),
    subtitle: `${sweep.mz.length} m/z points, ${sweep.ions} ions each` + (p ? `; peak m/z ${fmt(p.mz, 6)}, FWHM ${fmt(p.fwhm_mz, 3)}, R50 ${fmt(p.resolution_50, 4)}, R10 ${fmt(p.resolution_10, 4)}, transmission ${(100 * p.transmission).toFixed(1)} %` : '; no peak found'),
    legend: [{ label: 'transmission (detected / total)', color: c, mark: 'line' }, ...(p ? [{ label: 'peak centre', color: INK_SOFT, mark: 'dash' as const }] : [])],
    rows: 1, cols: 1,
    panels: [{
      x: { label: 'm/z', unit: '', min: lo, max: hi },
      y: { label: 'transmission', unit: '', min: 0, max: Math.min(1.05, tmax * 1.1), nice: false },
      draw: (ctx, g) => {
        if (p) {
          ctx.setLineDash([6, 4]); ctx.strokeStyle = INK_SOFT; ctx.lineWidth = 1;
          ctx.beginPath(); ctx.moveTo(g.px(p.mz), g.top); ctx.lineTo(g.px(p.mz), g.top + g.height); ctx.stroke();
          ctx.setLineDash([]);
        }
        ctx.strokeStyle = c; ctx.lineWidth = 2;
        ctx.beginPath();
        sweep.mz.forEach((m, i) => (i === 0 ? ctx.moveTo(g.px(m), g.py(sweep.transmission[i])) : ctx.lineTo(g.px(m), g.py(sweep.transmission[i]))));
        ctx.stroke();
      },
    }],
    footer: footerText(summary, runDir),
  };
}
