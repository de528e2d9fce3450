// Buffer-gas cooling: ensemble mean kinetic energy against time on a log axis, per-axis components,
// and the exponential with the run's fitted time constant τ (summary.cooling.tau_s); below, the
// cloud size (rms radius and rms z) against time. Data from history.arrow.

import { readHistory, readSpeciesHistory, type RunFolder } from '../../../sim/runfolder/index.js';
import { speciesColors } from '../../common/species.js';
import { INK, seriesColor } from '../../common/palette.js';
import { formatWithUnit } from '../../common/ticks.js';
import { extent } from '../axis.js';
import type { Ctx, FigureSpec, LegendEntry, PanelGeom } from '../figure.js';
import { PlotError, type PlotKind } from '../kind.js';
import { figureTitle, footerText } from '../provenance.js';

function polyline(ctx: Ctx, g: PanelGeom, t: ArrayLike<number>, y: ArrayLike<number>, color: string, width: number, dash: number[] = []): void {
  ctx.strokeStyle = color; ctx.lineWidth = width; ctx.setLineDash(dash);
  ctx.beginPath();
  let pen = false;
  for (let i = 0; i < t.length; i++) {
    const v = y[i];
    if (!Number.isFinite(v) || (g.y.log && v <= 0)) { pen = false; continue; }
    const X = g.px(t[i]), Y = g.py(v);
    if (pen) ctx.lineTo(X, Y); else { ctx.moveTo(X, Y); pen = true; }
  }
  ctx.stroke();
  ctx.setLineDash([]);
}

/**
 * The curve of the reported τ: E(t) = E∞ + A·exp(−t/τ). E∞ is the plateau as the engine defines it
 * (summary.cooling.plateau_mean_ke_ev, else the mean of the last 20 % of the samples, as in
 * sim/analysis/cooling.ts); with E∞ and τ fixed, A is the least-squares amplitude
 * Σ u(E − E∞) / Σ u², u = exp(−t/τ). Fixing E∞ keeps the curve sane when τ exceeds the run.
 */
export function exponentialWithTau(t: ArrayLike<number>, e: ArrayLike<number>, tau: number, plateau?: number): { floor: number; amp: number } {
  const idx: number[] = [];
  for (let i = 0; i < t.length; i++) if (Number.isFinite(e[i])) idx.push(i);
  if (idx.length === 0) return { floor: NaN, amp: NaN };
  let floor = plateau;
  if (floor === undefined || !Number.isFinite(floor)) {
    const tail = idx.slice(Math.floor(idx.length * 0.8));
    floor = tail.reduce((a, i) => a + e[i], 0) / tail.length;
  }
  let suu = 0, suy = 0;
  for (const i of idx) {
    const u = Math.exp(-t[i] / tau);
    suu += u * u; suy += u * (e[i] - floor);
  }
  return { floor, amp: suu > 0 ? suy / suu : NaN };
}

export const cooling: PlotKind = {
  name: 'cooling',
  describe: 'ensemble mean kinetic energy (log axis) with the fitted τ, and cloud size, against time; one curve per species',
  flags: {},
  async build(run: RunFolder): Promise<FigureSpec> {
    const h = readHistory(run.dir);
    if (h === null || h.t.length === 0) throw new PlotError(`${run.dir}: no history.arrow (cooling needs the ensemble history of a run)`);
    const hasGas = run.summary.cooling !== undefined && run.summary.cooling !== null;
    const tauRaw = (run.summary.cooling as { tau_s?: unknown } | undefined)?.tau_s;
    const tau = typeof tauRaw === 'number' && tauRaw > 0 ? tauRaw : null;
    const [t0, t1] = extent([h.t]);
    const [e0, e1] = extent([h.mean_ke_ev, h.mean_ke_x_ev, h.mean_ke_y_ev, h.mean_ke_z_ev], true);
    const plateauRaw = (run.summary.cooling as { plateau_mean_ke_ev?: unknown } | undefined)?.plateau_mean_ke_ev;
    const fit = tau === null ? null : exponentialWithTau(h.t, h.mean_ke_ev, tau, typeof plateauRaw === 'number' ? plateauRaw : undefined);
    const fitCurve = fit === null ? null : Float64Array.from(h.t, (t) => fit.floor + fit.amp * Math.exp(-t / tau!));
    const C = { total: seriesColor(0), x: seriesColor(1), y: seriesColor(2), z: seriesColor(3), fit: INK };
    const legend: LegendEntry[] = [
      { label: 'mean kinetic energy', color: C.total, mark: 'line' },
      { label: 'x part', color: C.x, mark: 'line' },
      { label: 'y part', color: C.y, mark: 'line' },
      { label: 'z part', color: C.z, mark: 'line' },
      fit && tau !== null
        ? { label: `E∞ + A·exp(−t/τ), fitted τ = ${formatWithUnit(tau, 's')}, plateau E∞ = ${formatWithUnit(fit.floor, 'eV')}`, color: C.fit, mark: 'dash' }
        : { label: hasGas ? 'no cooling time constant fitted (see summary.json warnings)' : 'no buffer gas in this run: no τ', color: C.fit, mark: 'dash' },
      { label: 'rms radius', color: seriesColor(4), mark: 'line' },
      { label: 'rms z', color: seriesColor(5), mark: 'line' },
    ];
    const rmsNote = 'dashed: rms radius of each species';
    // Several species: each one's mean energy and rms radius in its colour (history_species.arrow),
    // beside the whole cloud's; the x, y, z parts are left out there so that the curves stay legible.
    const sh = readSpeciesHistory(run.dir);
    const K = h.t.length;
    const species = sh === null ? [] : [...new Set(sh.population)].map((p) => {
      const pop = (run.summary.species ?? []).find((x) => x.population === p);
      return { mz: pop?.mz ?? NaN, ke: sh.mean_ke_ev.subarray(p * K, (p + 1) * K), r: sh.rms_radius_m.subarray(p * K, (p + 1) * K) };
    });
    const colorOf = speciesColors(species.map((s) => s.mz));
    const perSpecies = species.length > 1;
    if (perSpecies) {
      legend.splice(1, 3, ...species.map((s) => ({ label: `m/z ${s.mz}`, color: colorOf(s.mz), mark: 'line' as const })));
      legend[0] = { label: 'mean kinetic energy, whole cloud', color: C.total, mark: 'line' };
    }
    const [s0, s1] = extent([h.rms_radius_m, h.rms_z_m, ...species.map((s) => s.r)]);
    const [eLo, eHi] = perSpecies ? extent([h.mean_ke_ev, ...species.map((s) => s.ke)], true) : [e0, e1];
    return {
      title: figureTitle(run.summary, hasGas ? 'buffer-gas cooling' : 'ensemble energy and size'),
      subtitle: `${h.t.length} history samples; ${Math.round(h.n_alive[0])} ions alive at the start, ${Math.round(h.n_alive[h.n_alive.length - 1])} at the end${tau !== null && tau > t1 - t0 ? '; τ longer than the run: extrapolated' : ''}`,
      legend,
      rows: 2, cols: 1, sharedX: true,
      panels: [
        {
          x: { label: 'time', unit: 's', min: t0, max: t1, nice: false },
          y: { label: 'mean kinetic energy', unit: 'eV', min: eLo / 1.3, max: eHi * 1.3, log: true },
          draw: (ctx, g) => {
            if (perSpecies) for (const s of species) polyline(ctx, g, h.t, s.ke, colorOf(s.mz), 1.3);
            else {
              polyline(ctx, g, h.t, h.mean_ke_x_ev, C.x, 1);
              polyline(ctx, g, h.t, h.mean_ke_y_ev, C.y, 1);
              polyline(ctx, g, h.t, h.mean_ke_z_ev, C.z, 1);
            }
            polyline(ctx, g, h.t, h.mean_ke_ev, C.total, 2.2);
            if (fitCurve) polyline(ctx, g, h.t, fitCurve, C.fit, 1.5, [7, 4]);
            if (tau !== null && tau >= t0 && tau <= t1) {
              const X = Math.round(g.px(tau)) + 0.5;
              ctx.strokeStyle = C.fit; ctx.lineWidth = 1; ctx.setLineDash([2, 3]);
              ctx.beginPath(); ctx.moveTo(X, g.top); ctx.lineTo(X, g.top + g.height); ctx.stroke();
              ctx.setLineDash([]);
            }
          },
          note: tau !== null && tau >= t0 && tau <= t1 ? 'dotted line: t = τ' : undefined,
        },
        {
          x: { label: 'time', unit: 's', min: t0, max: t1, nice: false },
          y: { label: 'cloud size', unit: 'm', min: Math.min(0, s0), max: s1 },
          draw: (ctx, g) => {
            if (perSpecies) for (const s of species) polyline(ctx, g, h.t, s.r, colorOf(s.mz), 1.1, [5, 3]);
            polyline(ctx, g, h.t, h.rms_radius_m, seriesColor(4), 2);
            polyline(ctx, g, h.t, h.rms_z_m, seriesColor(5), 2);
          },
          note: perSpecies ? rmsNote : undefined,
        },
      ],
      footer: footerText(run.summary),
    };
  },
};
