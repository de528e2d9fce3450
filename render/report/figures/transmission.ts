// Fate of the ions per species: stacked bars of the share of each fate the engine knows
// (FATE_NAMES, sim/core/batch.ts; counts from summary.json species[]). For a filter or a TOF the
// detected share is the transmission; for a storage trap the ions still there at the end are stored.

import type { RunSummary } from '../../../sim/runfolder/index.js';
import { FATE_NAMES } from '../../../sim/core/batch.js';
import { seriesColor, INK } from '../../common/palette.js';
import { font } from '../../common/fonts.js';
import type { FigureSpec, LegendEntry } from '../../plot/figure.js';
import { figureTitle, footerText } from '../../plot/provenance.js';

/** Colour and label of each fate; a fate added to the engine later gets the next series colour. */
const KNOWN: Record<string, { label: string; color: string }> = {
  detected: { label: 'detected', color: seriesColor(2) },
  missed: { label: 'missed the detector', color: seriesColor(4) },
  hit: { label: 'struck an electrode or aperture', color: seriesColor(1) },
  returned: { label: 'returned through the entrance', color: seriesColor(3) },
  alive: { label: 'still in flight at max_time', color: seriesColor(0) },
};

export function fateParts(storage: boolean): { key: string; label: string; color: string }[] {
  return FATE_NAMES.map((f, i) => {
    const k = KNOWN[f] ?? { label: f, color: seriesColor(3 + i) };
    return { key: f, label: f === 'alive' && storage ? 'stored at the end of the run' : k.label, color: k.color };
  });
}

const fmtMz = (v: number) => String(Number(v.toPrecision(6)));

/** `storage`: a trap that holds its ions (the stored share is the figure of merit, not detection). */
export function transmissionFigure(summary: RunSummary, storage = false): FigureSpec {
  const sp = summary.species;
  const n = sp.length;
  const parts = fateParts(storage);
  const legend: LegendEntry[] = parts.map((p) => ({ label: p.label, color: p.color, mark: 'box' }));
  const count = (s: RunSummary['species'][number], key: string) => (typeof s[key] === 'number' ? (s[key] as number) : 0);
  return {
    title: figureTitle(summary, 'ion fates per species'),
    subtitle: `${summary.ions.total.toLocaleString('en-US')} ions; bar height = share of each species' ions; ${storage ? 'stored = still trapped at the end of the run' : 'transmission = detected share'}`,
    legend,
    rows: 1, cols: 1,
    panels: [{
      x: { label: 'species', unit: '', min: -0.5, max: n - 0.5, nice: false, integer: true, tickText: (v) => (Number.isInteger(v) && sp[v] ? `m/z ${fmtMz(sp[v].mz)}` : '') },
      y: { label: 'share of the species\' ions', unit: 'fraction', prefix: false, min: 0, max: 1.12, nice: false },
      draw: (ctx, g) => {
        const w = Math.min(120, 0.6 * (g.px(1) - g.px(0)));
        sp.forEach((s, i) => {
          let base = 0;
          for (const p of parts) {
            const f = s.total > 0 ? count(s, p.key) / s.total : 0;
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
          const share = storage ? (s.total > 0 ? count(s, 'alive') / s.total : 0) : s.transmission;
          ctx.fillText(`m/z ${fmtMz(s.mz)}: ${(100 * share).toFixed(1)} % ${storage ? 'stored' : 'detected'}`, g.px(i), g.py(1) - 8);
        });
      },
    }],
    footer: footerText(summary),
  };
}
