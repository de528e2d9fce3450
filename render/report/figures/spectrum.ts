// Simulated mass spectrum of a trap mass scan: the counts vs m/z that the engine binned from the
// ejection times through the ramp calibration (summary.json scan.spectrum), with the true m/z of
// each species marked and its apparent m/z, FWHM and resolution from scan.species.

import type { RunSummary } from '../../../sim/runfolder/index.js';
import { seriesColor, INK, INK_SOFT } from '../../common/palette.js';
import { font } from '../../common/fonts.js';
import type { FigureSpec, LegendEntry } from '../../plot/figure.js';
import { figureTitle, footerText } from '../../plot/provenance.js';
import { speciesColors } from '../../common/species.js';

export interface ScanBlock {
  mode?: string;
  ejection_qz?: number;
  /** A linear trap's radial scan gives ejection_qx instead. */
  ejection_qx?: number;
  species?: { population: number; mz: number; ejected: number; apparent_mz: number | null; fwhm_mz: number | null; resolution: number | null }[];
  spectrum?: { mz_low: number; bin_width_mz: number; counts: number[] };
}

const fmt = (v: number, d = 4): string => String(Number(v.toPrecision(d)));

/** "ejection q_z 0.9080" (3D trap, along z) or "ejection q_x 0.9080" (linear trap, radial). */
function ejectionText(scan: ScanBlock): string {
  if (scan.ejection_qx !== undefined) return `radial ejection q_x ${scan.ejection_qx.toFixed(4)}`;
  return `ejection q_z ${scan.ejection_qz !== undefined ? scan.ejection_qz.toFixed(4) : '?'}`;
}

/** The figure, or null when the scan has no spectrum or no counts. */
export function spectrumFigure(summary: RunSummary): FigureSpec | null {
  const scan = summary.scan as ScanBlock | undefined | null;
  const sp = scan?.spectrum;
  if (!sp || !Array.isArray(sp.counts) || !(sp.bin_width_mz > 0)) return null;
  const c = sp.counts;
  let first = -1, last = -1, cmax = 0;
  c.forEach((v, i) => { if (v > 0) { if (first < 0) first = i; last = i; } cmax = Math.max(cmax, v); });
  if (first < 0) return null;
  const species = scan!.species ?? [];
  const edge = (i: number) => sp.mz_low + i * sp.bin_width_mz;
  let lo = edge(first), hi = edge(last + 1);
  for (const s of species) { lo = Math.min(lo, s.mz); hi = Math.max(hi, s.mz); }
  const pad = 0.06 * (hi - lo || 10);
  lo -= pad; hi += pad;
  const legend: LegendEntry[] = [{ label: `counts per ${fmt(sp.bin_width_mz, 3)} m/z bin`, color: INK, mark: 'box' }];
  const speciesColor = speciesColors(summary.species.map((x) => x.mz));
  species.forEach((s) => legend.push({
    label: `m/z ${fmt(s.mz, 6)}: ${s.ejected} ejected${s.apparent_mz !== null ? `, apparent ${fmt(s.apparent_mz, 6)}` : ''}${s.fwhm_mz !== null ? `, FWHM ${fmt(s.fwhm_mz, 3)}` : ''}${s.resolution !== null ? `, R ${Math.round(s.resolution)}` : ''}`,
    color: speciesColor(s.mz), mark: 'dash',
  }));
  return {
    title: figureTitle(summary, 'simulated mass spectrum'),
    subtitle: `${scan!.mode ?? 'scan'} scan, ${ejectionText(scan!)}; dashed lines: true m/z of each species; R = m/Δm at FWHM`,
    legend,
    rows: 1, cols: 1,
    panels: [{
      x: { label: 'm/z', unit: '', min: lo, max: hi },
      y: { label: 'ions per bin', unit: '', min: 0, max: cmax * 1.1, integer: true },
      draw: (ctx, g) => {
        ctx.fillStyle = INK;
        for (let i = first; i <= last; i++) {
          if (c[i] === 0) continue;
          const x0 = g.px(edge(i)), x1 = g.px(edge(i + 1));
          ctx.fillRect(x0, g.py(c[i]), Math.max(1, x1 - x0 - (x1 - x0 > 4 ? 1 : 0)), g.py(0) - g.py(c[i]));
        }
        ctx.setLineDash([6, 4]);
        ctx.lineWidth = 1.5;
        species.forEach((s) => {
          ctx.strokeStyle = speciesColor(s.mz);
          ctx.beginPath(); ctx.moveTo(g.px(s.mz), g.top); ctx.lineTo(g.px(s.mz), g.top + g.height); ctx.stroke();
        });
        ctx.setLineDash([]);
      },
      overlay: (ctx, g) => {
        ctx.font = font(11);
        ctx.textAlign = 'left';
        ctx.fillStyle = INK_SOFT;
        species.forEach((s, i) => ctx.fillText(`${fmt(s.mz, 6)}`, g.px(s.mz) + 4, g.top + 14 + 14 * (i % 2)));
      },
    }],
    footer: footerText(summary),
  };
}
