// Figures of a field folder (`iontrail field`): the equipotential map of a plane with the
// electrodes drawn, the map of the deviation from the ideal field, and the multipole (or axis
// Legendre) bar chart. Same page layout, palette and fonts as the run figures (render/plot).

import { renderFigure, type Ctx, type FigureSpec, type LegendEntry, type PanelGeom } from '../plot/figure.js';
import { FRAME, INK_SOFT, seriesColor } from '../common/palette.js';
import { niceTicks } from '../common/ticks.js';
import type { FieldMap } from '../../sim/fields/slice.js';
import type { ImageFormat } from '../common/output.js';

/** Pixel size of the raster cells the maps are painted with (keeps SVG files small). */
const CELL = 3;

export interface FieldFigureText {
  title: string;
  subtitle: string;
  footer: string;
  /** Legend text per electrode, e.g. "x-pair 138 V + 832 V RF". */
  electrodes: string[];
}

/** Diverging ramp (blue, white, vermillion: ends of Okabe & Ito's set) for signed values at s in [−1, 1]. */
function diverging(s: number): [number, number, number] {
  const t = Math.max(-1, Math.min(1, s));
  const end = t < 0 ? [0, 114, 178] : [213, 94, 0];
  const a = Math.abs(t) ** 0.8;
  return [Math.round(255 + a * (end[0] - 255)), Math.round(255 + a * (end[1] - 255)), Math.round(255 + a * (end[2] - 255))];
}

function nodeAt(m: FieldMap, u: number, v: number): number {
  const hu = m.u.coords[1] - m.u.coords[0], hv = m.v.coords[1] - m.v.coords[0];
  const a = Math.round((u - m.u.coords[0]) / hu), b = Math.round((v - m.v.coords[0]) / hv);
  const nu = m.u.coords.length, nv = m.v.coords.length;
  if (a < 0 || a >= nu || b < 0 || b >= nv) return -1;
  return a + nu * b;
}

/** Paint the map: free nodes by `color(value)`, electrode nodes in their series colour. */
function paint(ctx: Ctx, g: PanelGeom, m: FieldMap, values: Float64Array, color: (v: number) => [number, number, number] | undefined): void {
  for (let py = g.top; py < g.top + g.height; py += CELL) {
    const v = g.y.min + (g.y.max - g.y.min) * (1 - (py + CELL / 2 - g.top) / g.height);
    for (let px = g.left; px < g.left + g.width; px += CELL) {
      const u = g.x.min + (g.x.max - g.x.min) * ((px + CELL / 2 - g.left) / g.width);
      const p = nodeAt(m, u, v);
      if (p < 0) continue;
      const e = m.inside[p];
      let rgb: [number, number, number] | undefined;
      if (e >= 0) {
        ctx.fillStyle = seriesColor(e);
        ctx.fillRect(px, py, CELL, CELL);
        continue;
      }
      rgb = color(values[p]);
      if (!rgb) continue;
      ctx.fillStyle = `rgb(${rgb[0]},${rgb[1]},${rgb[2]})`;
      ctx.fillRect(px, py, CELL, CELL);
    }
  }
}

/** Contour segments of `values` at `levels` (marching squares), skipping cells touching an electrode. */
function contours(ctx: Ctx, g: PanelGeom, m: FieldMap, values: Float64Array, levels: readonly number[], stroke: (lv: number) => string): void {
  const nu = m.u.coords.length, nv = m.v.coords.length;
  const U = m.u.coords, V = m.v.coords;
  ctx.lineWidth = 1;
  for (const lv of levels) {
    ctx.strokeStyle = stroke(lv);
    ctx.beginPath();
    for (let b = 0; b < nv - 1; b++) for (let a = 0; a < nu - 1; a++) {
      const p = [a + nu * b, a + 1 + nu * b, a + 1 + nu * (b + 1), a + nu * (b + 1)];
      if (p.some((q) => m.inside[q] >= 0)) continue;
      const f = p.map((q) => values[q] - lv);
      const cu = [U[a], U[a + 1], U[a + 1], U[a]], cv = [V[b], V[b], V[b + 1], V[b + 1]];
      const pts: [number, number][] = [];
      for (let e = 0; e < 4; e++) {
        const f0 = f[e], f1 = f[(e + 1) % 4];
        if ((f0 < 0) !== (f1 < 0)) {
          const t = f0 / (f0 - f1);
          pts.push([cu[e] + t * (cu[(e + 1) % 4] - cu[e]), cv[e] + t * (cv[(e + 1) % 4] - cv[e])]);
        }
      }
      for (let k = 0; k + 1 < pts.length; k += 2) {
        ctx.moveTo(g.px(pts[k][0]), g.py(pts[k][1]));
        ctx.lineTo(g.px(pts[k + 1][0]), g.py(pts[k + 1][1]));
      }
    }
    ctx.stroke();
  }
}

function freeRange(m: FieldMap, values: Float64Array): [number, number] {
  let lo = Infinity, hi = -Infinity;
  for (let i = 0; i < values.length; i++) if (m.inside[i] < 0 && Number.isFinite(values[i])) { lo = Math.min(lo, values[i]); hi = Math.max(hi, values[i]); }
  return Number.isFinite(lo) ? [lo, hi] : [0, 1];
}

const extent = (c: Float64Array): [number, number] => [c[0], c[c.length - 1]];

function electrodeLegend(t: FieldFigureText): LegendEntry[] {
  return t.electrodes.map((label, k) => ({ label, color: seriesColor(k), mark: 'box' as const }));
}

/** Equipotential map of a plane, electrodes filled in their colours. */
export function equipotentialSpec(m: FieldMap, t: FieldFigureText): { spec: FigureSpec; step: number } {
  const [lo, hi] = freeRange(m, m.values);
  const levels = niceTicks(lo, hi, 24).ticks.filter((v) => v > lo && v < hi);
  const step = levels.length > 1 ? levels[1] - levels[0] : hi - lo;
  const big = Math.max(Math.abs(lo), Math.abs(hi)) || 1;
  const spec: FigureSpec = {
    title: t.title,
    subtitle: t.subtitle,
    legend: [...electrodeLegend(t), { label: `equipotentials every ${Number(step.toPrecision(3))} V (shading: potential, blue < 0 < vermillion)`, color: INK_SOFT, mark: 'line' }],
    panels: [mapPanel(m, m.values, (v) => diverging(0.55 * v / big), levels, () => 'rgba(31,35,40,0.55)')],
    rows: 1, cols: 1, footer: t.footer,
  };
  return { spec, step };
}

/** One equal-aspect panel of a slice: `values` shaded by `shade`, contoured at `levels`. */
function mapPanel(m: FieldMap, values: Float64Array, shade: (v: number) => [number, number, number] | undefined, levels: readonly number[], ink: (level: number) => string): FigureSpec['panels'][number] {
  return {
    x: { label: m.u.name, unit: 'm', min: extent(m.u.coords)[0], max: extent(m.u.coords)[1], nice: false },
    y: { label: m.v.name, unit: 'm', min: extent(m.v.coords)[0], max: extent(m.v.coords)[1], nice: false },
    equalAspect: true,
    note: m.plane,
    draw(ctx, g) {
      paint(ctx, g, m, values, shade);
      contours(ctx, g, m, values, levels, ink);
    },
  };
}

/** Map of Φ − Φ_ideal in the free region, colour clipped at `clip` V. */
export function deviationSpec(m: FieldMap, deviation: Float64Array, clip: number, idealLabel: string, t: FieldFigureText): FigureSpec {
  const c = clip > 0 ? clip : 1;
  const levels = niceTicks(-c, c, 10).ticks.filter((v) => v > -c && v < c && v !== 0);
  return {
    title: t.title,
    subtitle: t.subtitle,
    legend: [...electrodeLegend(t),
      { label: `Φ − Φ ideal (${idealLabel}): blue < 0 < vermillion, full colour at ±${Number(c.toPrecision(2))} V; contours every ${Number((levels[1] - levels[0] || c).toPrecision(2))} V`, color: INK_SOFT, mark: 'line' }],
    panels: [mapPanel(m, deviation, (v) => diverging(v / c), levels, (lv) => (lv < 0 ? 'rgba(0,114,178,0.8)' : 'rgba(213,94,0,0.8)'))],
    rows: 1, cols: 1, footer: t.footer,
  };
}

export interface Bar {
  /** Order n. */
  n: number;
  /** The signed coefficient(s) drawn: one bar each, e.g. cos and sin parts. */
  parts: { label: string; value: number }[];
}

/** Bar chart of |coefficients| against order, log scale; filled bars positive, open bars negative. */
export function multipoleSpec(bars: Bar[], what: string, unit: string, t: FieldFigureText): FigureSpec {
  const mags = bars.flatMap((b) => b.parts.map((p) => Math.abs(p.value))).filter((v) => v > 0);
  const top = mags.length ? Math.max(...mags) : 1;
  // Ten decades below the largest term: the solver's residual (1e-10) sets the floor of meaning.
  const floor = Math.max(top * 1e-10, mags.length ? Math.min(...mags) : top * 1e-6);
  const nParts = bars[0]?.parts.length ?? 1;
  const labels = bars[0]?.parts.map((p) => p.label) ?? [];
  const ns = bars.map((b) => b.n);
  return {
    title: t.title,
    subtitle: t.subtitle,
    legend: [
      ...labels.map((l, k) => ({ label: `${l} (filled: positive, open: negative)`, color: seriesColor(k), mark: 'box' as const })),
    ],
    panels: [{
      x: { label: 'order n', unit: '', min: Math.min(...ns) - 0.7, max: Math.max(...ns) + 0.7, nice: false, integer: true },
      y: { label: `|${what}|`, unit, min: floor / 2, max: top * 2, log: true, prefix: false },
      draw(ctx, g) {
        const w = Math.max(2, Math.min(24, (g.px(1) - g.px(0)) * 0.8 / nParts));
        bars.forEach((b) => b.parts.forEach((p, k) => {
          const a = Math.abs(p.value);
          if (!(a > 0)) return;
          const x = g.px(b.n) + (k - (nParts - 1) / 2) * w - w / 2;
          const y0 = g.py(Math.max(a, floor / 2)), y1 = g.py(floor / 2);
          ctx.fillStyle = seriesColor(k);
          ctx.strokeStyle = seriesColor(k);
          ctx.lineWidth = 1.5;
          if (p.value > 0) ctx.fillRect(x, y0, w, y1 - y0);
          else ctx.strokeRect(x + 0.75, y0, w - 1.5, y1 - y0);
        }));
        ctx.strokeStyle = FRAME;
      },
    }],
    rows: 1, cols: 1, footer: t.footer,
  };
}

export async function renderSpec(spec: FigureSpec, format: ImageFormat, width = 1000, height = 820): Promise<Buffer> {
  return renderFigure(spec, { width, height, format });
}
