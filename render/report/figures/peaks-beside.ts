// Peaks of two scenes swept over the same m/z points, drawn on one axis: transmission against m/z
// for each, a dashed line at each peak centre, and each peak's FWHM, R50 and transmission in the
// legend. Used by `iontrail report SCENE --beside OTHER` (e.g. round rods beside hyperbolic rods).

import { INK_SOFT, SERIES_COLORS } from '../../common/palette.js';
import type { FigureSpec } from '../../plot/figure.js';
import type { SweepPeak } from './peak.js';

export interface BesideCurve {
  /** Legend name of the scene (its name in the scene file). */
  name: string;
  mz: number[];
  transmission: number[];
  peak: SweepPeak | null;
}

const fmt = (v: number | null, d = 4): string => (v === null ? '—' : String(Number(v.toPrecision(d))));

export function peaksBesideFigure(curves: BesideCurve[], ions: number, footer: string): FigureSpec | null {
  const all = curves.flatMap((c) => c.mz);
  if (all.length < 2) return null;
  const lo = Math.min(...all), hi = Math.max(...all);
  const tmax = Math.max(0.05, ...curves.flatMap((c) => c.transmission));
  const color = (k: number) => SERIES_COLORS[k % SERIES_COLORS.length];
  const shift = curves.length === 2 && curves[0].peak && curves[1].peak ? curves[0].peak.mz - curves[1].peak.mz : null;
  return {
    title: 'Peak shape beside another filter (m/z sweep)',
    subtitle: `${curves[0].mz.length} m/z points, ${ions} ions each` + (shift !== null ? `; peak centres ${fmt(shift, 3)} m/z apart` : ''),
    legend: curves.map((c, k) => ({
      label: `${c.name}: ` + (c.peak ? `peak m/z ${fmt(c.peak.mz, 6)}, FWHM ${fmt(c.peak.fwhm_mz, 3)}, R50 ${fmt(c.peak.resolution_50, 4)}, R10 ${fmt(c.peak.resolution_10, 4)}, T ${(100 * c.peak.transmission).toFixed(1)} %` : 'no peak found'),
      color: color(k), mark: 'line' as 'line' | 'dash',
    })).concat([{ label: 'peak centre (midpoint of the 50 % crossings)', color: INK_SOFT, mark: 'dash' }]),
    rows: 1, cols: 1,
    panels: [{
      x: { label: 'm/z', unit: '', min: lo, max: hi },
      y: { label: 'transmission', unit: 'fraction', prefix: false, min: 0, max: Math.min(1.05, tmax * 1.1), nice: false },
      draw: (ctx, g) => {
        curves.forEach((c, k) => {
          if (c.peak) {
            ctx.setLineDash([6, 4]); ctx.strokeStyle = color(k); ctx.lineWidth = 1;
            ctx.beginPath(); ctx.moveTo(g.px(c.peak.mz), g.top); ctx.lineTo(g.px(c.peak.mz), g.top + g.height); ctx.stroke();
            ctx.setLineDash([]);
          }
          ctx.strokeStyle = color(k); ctx.lineWidth = 2;
          ctx.beginPath();
          c.mz.forEach((m, i) => (i === 0 ? ctx.moveTo(g.px(m), g.py(c.transmission[i])) : ctx.lineTo(g.px(m), g.py(c.transmission[i]))));
          ctx.stroke();
        });
      },
    }],
    footer,
  };
}
