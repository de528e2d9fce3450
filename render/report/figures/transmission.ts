// Fate of the ions per species: stacked bars of the detected, missed, struck, returned and stored fractions
// (summary.json species[]). For a filter the detected share is the transmission; for a trap the
// stored share is what the trap holds at the end of the run.

import type { RunSummary } from '../../../sim/runfolder/index.js';
import { seriesColor, INK } from '../../common/palette.js';
import { font } from '../../common/fonts.js';
import type { FigureSpec, LegendEntry } from '../../plot/figure.js';
import { figureTitle, footerText } from '../../plot/provenance.js';

const PARTS = [
  { key: 'detected', label: 'detected', color: seriesColor(2) },
  { key: 'missed', label: 'missed the detector', color: seriesColor(4) },
  { key: 'hit', label: 'struck an electrode or aperture', color: seriesColor(1) },
  { key: 'returned', label: 'returned through the entrance', color: seriesColor(3) },
  { key: 'alive', label: 'still in flight / stored at max_time', color: seriesColor(0) },
] as const;

export function transmissionFigure(summary: RunSummary, runDir: string): FigureSpec {
  const sp = summary.species;
  const n = sp.length;
  const legend: LegendEntry[] = PARTS.map((p) => ({ label: p.label, color: p.color, mark: 'box' }));
  return {
    title: figureTitle(summary, 'ion fates per species'),
    subtitle: `${summary.ions.total.toLocaleString('en-US')} ions; bar height = share of each species' ions; transmission = detected share`,
    legend,
    rows: 1, cols: 1,
    panels: [{
      x: { label: 'population', unit: '', min: -0.5, max: n - 0.5, nice: false, integer: true },
      y: { label: 'share of ions', unit: '', min: 0, max: 1.12, nice: false },
      draw: (ctx, g) => {
        const w = Math.min(120, 0.6 * (g.px(1) - g.px(0)));
        sp.forEach((s, i) => {
          let base = 0;
          for (const p of PARTS) {
            const f = s.total > 0 ? ((s[p.key] as number | undefined) ?? 0) / s.total : 0;
            if (f > 0) {
              ctx.fillStyle = p.color;
              ctx.fillRect(g.px(i) - w / 2, g.py(base + f), w, g.py(base) - g.py(base + f));
            }
            base += f;
          }
        });
      },
      overlay: (ctx, g) => {
        ctx.fillStyle = INK;
        ctx.font = font(12);
        ctx.textAlign = 'center';
        sp.forEach((s, i) => {
          ctx.fillText(`m/z ${Number(s.mz.toPrecision(6))}: ${(100 * s.transmission).toFixed(1)} % detected`, g.px(i), g.py(1) - 8);
        });
      },
    }],
    footer: footerText(summary, runDir),
  };
}
