// Time-of-flight figures of a report, from summary.json `tof` and the ions table:
//   calibration  arrival-peak centres against √(m/z) with the fitted t = t0 + k·√(m/z) and residuals
//   source       arrival-time offset against start position: the space focus of a two-field source
//                (Wiley & McLaren, Rev. Sci. Instrum. 26, 1150 (1955))
//   reflectron   arrival-time offset against initial energy, this run vs a field-free analyzer of
//                the same mean flight time (Mamyrin et al., Sov. Phys. JETP 37, 45 (1973))

import type { RunFolder, RunSummary } from '../../../sim/runfolder/index.js';
import { ATOMIC_MASS_UNIT, ELEMENTARY_CHARGE } from '../../../sim/units/constants.js';
import { seriesColor, INK, INK_SOFT } from '../../common/palette.js';
import { formatWithUnit } from '../../common/ticks.js';
import type { Ctx, FigureSpec, LegendEntry, PanelGeom } from '../../plot/figure.js';
import { extent, padded } from '../../plot/axis.js';
import { figureTitle, footerText } from '../../plot/provenance.js';
import { speciesColors } from '../../common/species.js';

interface TofSpecies { population: number; mz: number; arrival_time_s: number | null; fwhm_s: number | null; resolution_fwhm: number | null }
export interface TofBlock {
  species?: TofSpecies[];
  calibration?: { t0_s: number; k_s_per_sqrt_mz: number } | null;
  source?: { space_focus_distance_m: number; drift_to_detector_m: number; extraction_voltage_for_focus_at_detector_v: number | null; extraction_field_v_per_m: number };
  reflectron?: { voltage_v: number; voltage_for_energy_focus_v: number; penetration_m: number; field_free_path_m: number };
}

const fmt = (v: number, d = 4): string => String(Number(v.toPrecision(d)));

function tofOf(summary: RunSummary): TofBlock | null {
  const t = summary.tof as TofBlock | undefined | null;
  return t && typeof t === 'object' ? t : null;
}

function dots(ctx: Ctx, g: PanelGeom, xs: ArrayLike<number>, ys: ArrayLike<number>, color: string, r = 2, alpha = 0.6): void {
  ctx.fillStyle = color;
  ctx.globalAlpha = alpha;
  for (let i = 0; i < xs.length; i++) {
    ctx.beginPath(); ctx.arc(g.px(xs[i]), g.py(ys[i]), r, 0, 2 * Math.PI); ctx.fill();
  }
  ctx.globalAlpha = 1;
}

/** Mass calibration t = t0 + k√(m/z) over the species' peak centres (needs two or more peaks). */
export function calibrationFigure(summary: RunSummary): FigureSpec | null {
  const tof = tofOf(summary);
  const cal = tof?.calibration;
  const pts = (tof?.species ?? []).filter((s) => s.arrival_time_s !== null);
  if (!cal || pts.length < 2) return null;
  const sx = pts.map((s) => Math.sqrt(s.mz));
  const ty = pts.map((s) => s.arrival_time_s as number);
  const speciesColor = speciesColors(summary.species.map((x) => x.mz));
  const fit = (r: number) => cal.t0_s + cal.k_s_per_sqrt_mz * r;
  const res = pts.map((_, i) => ty[i] - fit(sx[i]));
  const [x0, x1] = padded(extent([sx]), 0.08);
  const [r0, r1] = padded(extent([res, [0]]), 0.25);
  const legend: LegendEntry[] = [
    { label: `fit t = t0 + k·√(m/z): t0 = ${formatWithUnit(cal.t0_s, 's', 4)}, k = ${formatWithUnit(cal.k_s_per_sqrt_mz, 's', 6)}`, color: INK, mark: 'line' },
    ...pts.map((s) => ({ label: `m/z ${fmt(s.mz, 6)}: t = ${formatWithUnit(s.arrival_time_s as number, 's', 6)}`, color: speciesColor(s.mz), mark: 'point' as const })),
  ];
  return {
    title: figureTitle(summary, 'mass calibration'),
    subtitle: 'arrival-peak centres of the species against √(m/z), least-squares line, and residuals',
    legend, rows: 2, cols: 1, sharedX: true,
    panels: [
      {
        x: { label: '√(m/z)', unit: '', min: x0, max: x1 },
        y: { label: 'arrival time', unit: 's', ...rangeOf(padded(extent([ty, [fit(x0), fit(x1)]]), 0.05)) },
        draw: (ctx, g) => {
          ctx.strokeStyle = INK; ctx.lineWidth = 1.5;
          ctx.beginPath(); ctx.moveTo(g.px(x0), g.py(fit(x0))); ctx.lineTo(g.px(x1), g.py(fit(x1))); ctx.stroke();
          pts.forEach((s, i) => dots(ctx, g, [sx[i]], [ty[i]], speciesColor(s.mz), 5, 1));
        },
      },
      {
        x: { label: '√(m/z)', unit: '', min: x0, max: x1 },
        y: { label: 'residual', unit: 's', min: r0, max: r1 },
        draw: (ctx, g) => {
          ctx.strokeStyle = INK_SOFT; ctx.lineWidth = 1;
          ctx.beginPath(); ctx.moveTo(g.left, g.py(0)); ctx.lineTo(g.left + g.width, g.py(0)); ctx.stroke();
          pts.forEach((s, i) => dots(ctx, g, [sx[i]], [res[i]], speciesColor(s.mz), 5, 1));
        },
      },
    ],
    footer: footerText(summary),
  };
}

function rangeOf([min, max]: [number, number]): { min: number; max: number } { return { min, max }; }

/** Detected ions per population: index lists into the ions table. */
function detectedByPopulation(run: RunFolder): Map<number, number[]> {
  const by = new Map<number, number[]>();
  const I = run.ions;
  for (let r = 0; r < I.ion.length; r++) {
    if (I.fate[r] !== 'detected' || !Number.isFinite(I.end_time[r])) continue;
    const l = by.get(I.population[r]) ?? [];
    l.push(r);
    by.set(I.population[r], l);
  }
  return by;
}

const mean = (v: number[]): number => v.reduce((a, b) => a + b, 0) / v.length;

/** Arrival-time offset from each species' mean against the start position along z. */
export function sourceFocusFigure(run: RunFolder): FigureSpec | null {
  const src = tofOf(run.summary)?.source;
  if (!src) return null;
  const by = detectedByPopulation(run);
  if (by.size === 0) return null;
  const I = run.ions;
  const series: { mz: number; dz: Float64Array; dt: Float64Array }[] = [];
  for (const [, rows] of [...by.entries()].sort((a, b) => a[0] - b[0])) {
    const zm = mean(rows.map((r) => I.z0[r])), tm = mean(rows.map((r) => I.end_time[r]));
    series.push({ mz: I.mz[rows[0]], dz: Float64Array.from(rows, (r) => I.z0[r] - zm), dt: Float64Array.from(rows, (r) => I.end_time[r] - tm) });
  }
  const [xa, xb] = padded(extent(series.map((s) => s.dz)));
  const [ya, yb] = padded(extent(series.map((s) => s.dt)));
  const speciesColor = speciesColors(run.summary.species.map((x) => x.mz));
  const legend: LegendEntry[] = series.map((s) => ({ label: `m/z ${fmt(s.mz, 6)}`, color: speciesColor(s.mz), mark: 'point' }));
  const vFocus = src.extraction_voltage_for_focus_at_detector_v;
  return {
    title: figureTitle(run.summary, 'source space focus'),
    subtitle: `first-order space focus ${formatWithUnit(src.space_focus_distance_m, 'm', 4)} after the source, detector at ${formatWithUnit(src.drift_to_detector_m, 'm', 4)}` +
      (vFocus !== null ? `; extraction ${formatWithUnit(vFocus, 'V', 4)} would put the focus on the detector (Wiley & McLaren 1955)` : ''),
    legend, rows: 1, cols: 1,
    panels: [{
      x: { label: 'start position − species mean (z)', unit: 'm', min: xa, max: xb },
      y: { label: 'arrival time − species mean', unit: 's', min: ya, max: yb },
      note: 'a flat band means the start-position spread is focused at the detector',
      draw: (ctx, g) => series.forEach((s) => dots(ctx, g, s.dz, s.dt, speciesColor(s.mz))),
    }],
    footer: footerText(run.summary),
  };
}

/**
 * Arrival-time offset against initial kinetic energy: the run (with reflectron), and the flight
 * times a field-free analyzer of the same mean flight time would give the same ions,
 * t_i = t̄·√(Ū/U_i) with U_i the ion's kinetic energy at the detector (the drift energy) — the
 * same comparison as summary.json tof.species[].linear_equivalent_* (sim/analysis/tof-summary.ts).
 */
export function reflectronFigure(run: RunFolder): FigureSpec | null {
  const refl = tofOf(run.summary)?.reflectron;
  if (!refl) return null;
  const by = detectedByPopulation(run);
  if (by.size === 0) return null;
  const I = run.ions;
  const e: number[] = [], dtR: number[] = [], dtL: number[] = [];
  for (const rows of by.values()) {
    const tm = mean(rows.map((r) => I.end_time[r]));
    const um = mean(rows.map((r) => I.end_ke_ev[r]));
    for (const r of rows) {
      const m = I.mz[r] * Math.abs(I.charge[r]) * ATOMIC_MASS_UNIT;
      const v2 = I.vx0[r] ** 2 + I.vy0[r] ** 2 + I.vz0[r] ** 2;
      e.push((0.5 * m * v2) / ELEMENTARY_CHARGE); // initial kinetic energy, eV
      dtR.push(I.end_time[r] - tm);
      dtL.push(tm * Math.sqrt(um / I.end_ke_ev[r]) - tm);
    }
  }
  const [xa, xb] = padded(extent([e]));
  const [ya, yb] = padded(extent([dtR, dtL]));
  const cR = seriesColor(0), cL = seriesColor(1);
  return {
    title: figureTitle(run.summary, 'reflectron energy focusing'),
    subtitle: `reflectron ${formatWithUnit(refl.voltage_v, 'V', 4)} (first-order focus at ${formatWithUnit(refl.voltage_for_energy_focus_v, 'V', 5)}, L = 4p: Mamyrin et al. 1973); offsets from each species' mean, all species`,
    legend: [
      { label: 'with reflectron (this run)', color: cR, mark: 'point' },
      { label: 'field-free analyzer of the same mean flight time, t̄·√(Ū/U)', color: cL, mark: 'point' },
    ],
    rows: 1, cols: 1,
    panels: [{
      x: { label: 'initial kinetic energy', unit: 'eV', min: xa, max: xb },
      y: { label: 'arrival time − species mean', unit: 's', min: ya, max: yb },
      draw: (ctx, g) => { dots(ctx, g, e, dtL, cL, 2, 0.45); dots(ctx, g, e, dtR, cR, 2, 0.7); },
    }],
    footer: footerText(run.summary),
  };
}
