// Peak shape of a quadrupole filter: transmission against m/z from an m/z sweep of the scene
// (sim/sweeps/sweep.ts), with the peak figures the sweep reports (centre, FWHM, m/Δm at 50 % and
// 10 % height, transmission at the peak).

import type { RunSummary } from '../../../sim/runfolder/index.js';
import { INK, INK_SOFT } from '../../common/palette.js';
import { speciesColors } from '../../common/species.js';
import { font } from '../../common/fonts.js';
import { crossings } from '../../../sim/analysis/peak.js';
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

export function peakShapeFigure(sweep: SweepCurve, summary: RunSummary): FigureSpec | null {
  if (sweep.mz.length < 2) return null;
  const lo = Math.min(...sweep.mz), hi = Math.max(...sweep.mz);
  const tmax = Math.max(0.05, ...sweep.transmission);
  const p = sweep.peak;
  // The scene's species colour (the sweep moves the first population's m/z).
  const c = speciesColors(summary.species.map((x) => x.mz))(summary.species[0]?.mz ?? NaN);
  const tpk = Math.max(...sweep.transmission);
  // The same crossings as the reported widths (sim/analysis/peak.ts), drawn at 50 % and 10 % of the maximum.
  const marks = p ? [0.5, 0.1].map((f) => ({ f, level: f * tpk, ...crossings(sweep.mz, sweep.transmission, f) })) : [];
  const widthText = (m: { f: number; low: number | null; high: number | null }) =>
    m.low === null || m.high === null ? 'not bounded in the sweep' : `${fmt(m.high - m.low, 3)} m/z`;
  return {
    title: figureTitle(summary, 'peak shape (m/z sweep)'),
    subtitle: `${sweep.mz.length} m/z points, ${sweep.ions} ions each` + (p ? `; peak m/z ${fmt(p.mz, 6)}, FWHM ${fmt(p.fwhm_mz, 3)}, R50 ${fmt(p.resolution_50, 4)}, R10 ${fmt(p.resolution_10, 4)}, transmission ${(100 * p.transmission).toFixed(1)} %` : '; no peak found'),
    legend: [
      { label: 'transmission (detected / total)', color: c, mark: 'line' },
      ...(p ? [
        { label: 'peak centre (midpoint of the 50 % crossings)', color: INK_SOFT, mark: 'dash' as const },
        { label: `FWHM at 50 % of the maximum: ${widthText(marks[0])}`, color: INK, mark: 'line' as const },
        { label: `width at 10 % of the maximum: ${widthText(marks[1])}`, color: INK_SOFT, mark: 'line' as const },
      ] : []),
    ],
    rows: 1, cols: 1,
    panels: [{
      x: { label: 'm/z', unit: '', min: lo, max: hi },
      y: { label: 'transmission', unit: 'fraction', prefix: false, min: 0, max: Math.min(1.05, tmax * 1.1), nice: false },
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
        // Width marks: a bar between the crossings with end ticks, at the level it is measured.
        marks.forEach((m, k) => {
          if (m.low === null || m.high === null) return;
          const Y = g.py(m.level), X0 = g.px(m.low), X1 = g.px(m.high);
          ctx.strokeStyle = k === 0 ? INK : INK_SOFT; ctx.lineWidth = 1.5;
          ctx.beginPath(); ctx.moveTo(X0, Y); ctx.lineTo(X1, Y);
          ctx.moveTo(X0, Y - 5); ctx.lineTo(X0, Y + 5); ctx.moveTo(X1, Y - 5); ctx.lineTo(X1, Y + 5);
          ctx.stroke();
        });
      },
      overlay: (ctx, g) => {
        ctx.font = font(11); ctx.textAlign = 'center';
        marks.forEach((m, k) => {
          if (m.low === null || m.high === null) return;
          ctx.fillStyle = k === 0 ? INK : INK_SOFT;
          ctx.fillText(`${k === 0 ? 'FWHM' : '10 % width'} ${fmt(m.high - m.low, 3)}`, g.px(0.5 * (m.low + m.high)), g.py(m.level) - 7);
        });
      },
    }],
    footer: footerText(summary),
  };
}
