// Page layout shared by every 2D figure: title (the scene name), a legend strip under it, a grid of
// panels (optionally sharing the x axis, then only the bottom row is labelled), and a footer with the
// run's provenance. Kinds describe panels; this module measures the tick labels, places everything
// so nothing overlaps, draws frames, grid, ticks and labels, and hands each panel a clipped context.

import { createCanvas, SvgExportFlag, type SKRSContext2D } from '@napi-rs/canvas';
import { font } from '../common/fonts.js';
import { FRAME, GRID, INK, INK_SOFT, PANEL, PAPER, densityRgb } from '../common/palette.js';
import { finishSvg, type ImageFormat } from '../common/output.js';
import { Axis, type AxisSpec } from './axis.js';

export type Ctx = SKRSContext2D;

export interface LegendEntry {
  label: string;
  color: string;
  /** How the swatch is drawn. */
  mark: 'line' | 'dash' | 'point' | 'ring' | 'box' | 'region' | 'ramp';
  /** Fill of a 'region' swatch (its edge is `color`). */
  fill?: string;
}

export interface PanelGeom {
  left: number; top: number; width: number; height: number;
  x: Axis; y: Axis;
  /** Data → pixel. */
  px(v: number): number;
  py(v: number): number;
  /** Linear coefficients px = ax + bx·v (linear axes only; for fast loops). */
  ax: number; bx: number; ay: number; by: number;
}

export interface PanelSpec {
  x: AxisSpec;
  y: AxisSpec;
  /** Draw the data; the context is clipped to the plot area. */
  draw(ctx: Ctx, g: PanelGeom): void;
  /** Draw on top without clipping (labels that may touch the frame). */
  overlay?(ctx: Ctx, g: PanelGeom): void;
  /** Short text at the panel's top-left corner inside the frame. */
  note?: string;
  /** Same pixel scale on both axes (x–y projections). */
  equalAspect?: boolean;
}

export interface FigureSpec {
  title: string;
  subtitle?: string;
  legend: LegendEntry[];
  panels: PanelSpec[];
  rows: number;
  cols: number;
  /** Panels in a column share the x axis (stacked time traces). */
  sharedX?: boolean;
  footer: string;
}

export interface RenderOptions {
  width: number;
  height: number;
  format: ImageFormat;
}

const PAD = 14;
const TITLE_PX = 17;
const SUB_PX = 12;
const TICK_PX = 11;
const LABEL_PX = 12;
const LEGEND_PX = 12;
const FOOT_PX = 10;

interface LegendLayout { rows: { entry: LegendEntry; x: number; w: number }[][]; height: number }

function layoutLegend(ctx: Ctx, entries: LegendEntry[], width: number): LegendLayout {
  ctx.font = font(LEGEND_PX);
  const rows: LegendLayout['rows'] = [];
  let row: LegendLayout['rows'][number] = [];
  let x = 0;
  for (const entry of entries) {
    const w = 26 + ctx.measureText(entry.label).width + 18;
    if (x + w > width && row.length > 0) { rows.push(row); row = []; x = 0; }
    row.push({ entry, x, w });
    x += w;
  }
  if (row.length > 0) rows.push(row);
  return { rows, height: rows.length * (LEGEND_PX + 8) };
}

function drawSwatch(ctx: Ctx, e: LegendEntry, x: number, y: number): void {
  ctx.strokeStyle = e.color;
  ctx.fillStyle = e.color;
  ctx.lineWidth = 2;
  ctx.setLineDash(e.mark === 'dash' ? [5, 3] : []);
  if (e.mark === 'line' || e.mark === 'dash') {
    ctx.beginPath(); ctx.moveTo(x, y); ctx.lineTo(x + 20, y); ctx.stroke();
  } else if (e.mark === 'point') {
    ctx.beginPath(); ctx.arc(x + 10, y, 4, 0, 2 * Math.PI); ctx.fill();
  } else if (e.mark === 'ring') {
    ctx.beginPath(); ctx.arc(x + 10, y, 4, 0, 2 * Math.PI); ctx.stroke();
  } else if (e.mark === 'ramp') {
    for (let i = 0; i < 20; i++) {
      const [r, g, b] = densityRgb(0.15 + 0.85 * (i / 19));
      ctx.fillStyle = `rgb(${r},${g},${b})`;
      ctx.fillRect(x + i, y - 5, 1, 10);
    }
    ctx.strokeStyle = FRAME; ctx.lineWidth = 1;
    ctx.strokeRect(x + 0.5, y - 5.5, 20, 11);
  } else if (e.mark === 'region') {
    ctx.fillStyle = e.fill ?? e.color;
    ctx.fillRect(x + 2, y - 6, 16, 12);
    ctx.lineWidth = 1.5;
    ctx.strokeRect(x + 2, y - 6, 16, 12);
  } else {
    ctx.fillRect(x + 3, y - 5, 14, 10);
  }
  ctx.setLineDash([]);
}

function maxTickWidth(ctx: Ctx, a: Axis): number {
  ctx.font = font(TICK_PX);
  let w = 0;
  for (const t of a.ticks) if (t.text) w = Math.max(w, ctx.measureText(t.text).width);
  return w;
}

/** Draw the figure and return the encoded PNG or SVG bytes. */
export async function renderFigure(spec: FigureSpec, opt: RenderOptions): Promise<Buffer> {
  const { width, height } = opt;
  const svg = opt.format === 'svg';
  // SVG keeps text as text (no ConvertTextToPaths); finishSvg adds the viewBox.
  const canvas = svg ? createCanvas(width, height, SvgExportFlag.NoPrettyXML) : createCanvas(width, height);
  const ctx = canvas.getContext('2d') as Ctx;
  // The SVG backend writes each shaped glyph back as a character: without this "fl" in
  // "reflectron" would come out as the ligature U+FB02, and a search for the word would miss it.
  if (svg) (ctx as unknown as { fontVariantLigatures: string }).fontVariantLigatures = 'none';
  drawFigure(ctx, spec, width, height);
  if (svg) return finishSvg((canvas as unknown as { getContent(): Buffer }).getContent(), width, height);
  return (canvas as unknown as { encode(f: 'png'): Promise<Buffer> }).encode('png');
}

export function drawFigure(ctx: Ctx, spec: FigureSpec, width: number, height: number): void {
  ctx.fillStyle = PAPER;
  ctx.fillRect(0, 0, width, height);
  ctx.textBaseline = 'alphabetic';

  // Title block.
  let y = PAD + TITLE_PX;
  ctx.fillStyle = INK;
  ctx.font = font(TITLE_PX, true);
  ctx.textAlign = 'left';
  ctx.fillText(fitText(ctx, spec.title, width - 2 * PAD), PAD, y);
  if (spec.subtitle) {
    y += SUB_PX + 6;
    ctx.font = font(SUB_PX);
    ctx.fillStyle = INK_SOFT;
    ctx.fillText(fitText(ctx, spec.subtitle, width - 2 * PAD), PAD, y);
  }
  y += 10;

  // Legend strip.
  const legend = layoutLegend(ctx, spec.legend, width - 2 * PAD);
  ctx.font = font(LEGEND_PX);
  ctx.textAlign = 'left';
  legend.rows.forEach((row, r) => {
    const cy = y + r * (LEGEND_PX + 8) + LEGEND_PX / 2 + 2;
    for (const item of row) {
      drawSwatch(ctx, item.entry, PAD + item.x, cy);
      ctx.fillStyle = INK;
      ctx.fillText(item.entry.label, PAD + item.x + 26, cy + LEGEND_PX / 2 - 2);
    }
  });
  y += legend.height + (legend.rows.length > 0 ? 6 : 0);

  // Footer.
  const footerTop = height - PAD - FOOT_PX;
  ctx.font = font(FOOT_PX);
  ctx.fillStyle = INK_SOFT;
  ctx.fillText(fitText(ctx, spec.footer, width - 2 * PAD), PAD, height - PAD);

  // Panel grid. Margins from the widest tick label so labels never collide with the frame.
  const axes = spec.panels.map((p) => ({ x: new Axis(p.x), y: new Axis(p.y) }));
  const tickW = Math.max(0, ...axes.map((a) => maxTickWidth(ctx, a.y)));
  const leftM = Math.ceil(LABEL_PX + 10 + tickW + 8);
  const bottomM = TICK_PX + LABEL_PX + 16;
  const gapX = 18, gapY = spec.sharedX ? 14 : 14;
  const areaTop = y + 4, areaBottom = footerTop - 8;
  const cellW = (width - PAD - leftM * spec.cols - gapX * (spec.cols - 1) - PAD) / spec.cols;
  const rowsBottom = spec.sharedX ? bottomM : 0;
  const cellH = (areaBottom - areaTop - rowsBottom - (spec.sharedX ? gapY : (gapY + bottomM)) * (spec.rows - 1) - (spec.sharedX ? 0 : bottomM)) / spec.rows;

  spec.panels.forEach((p, i) => {
    const r = Math.floor(i / spec.cols), c = i % spec.cols;
    let left = PAD + leftM + c * (cellW + leftM + gapX);
    let top = areaTop + r * (cellH + gapY + (spec.sharedX ? 0 : bottomM));
    let w = cellW, h = cellH;
    const { x, y: ya } = axes[i];
    if (p.equalAspect) {
      // Shrink one side so that a metre is the same number of pixels on both axes.
      const sx = w / (x.max - x.min), sy = h / (ya.max - ya.min);
      if (sx > sy) { const nw = (x.max - x.min) * sy; left += (w - nw) / 2; w = nw; }
      else { const nh = (ya.max - ya.min) * sx; top += (h - nh) / 2; h = nh; }
    }
    const showX = !spec.sharedX || r === spec.rows - 1 || i + spec.cols >= spec.panels.length;
    const g = geometry(left, top, w, h, x, ya);
    drawPanel(ctx, p, g, showX);
  });
}

function geometry(left: number, top: number, width: number, height: number, x: Axis, y: Axis): PanelGeom {
  const bx = width / (x.max - x.min), ax = left - x.min * bx;
  const by = -height / (y.max - y.min), ay = top + height - y.min * by;
  return {
    left, top, width, height, x, y, ax, bx, ay, by,
    px: (v) => left + x.frac(v) * width,
    py: (v) => top + height - y.frac(v) * height,
  };
}

function drawPanel(ctx: Ctx, p: PanelSpec, g: PanelGeom, showX: boolean): void {
  const { left, top, width, height } = g;
  ctx.fillStyle = PANEL;
  ctx.fillRect(left, top, width, height);
  // Grid at major ticks (fainter for log minors).
  ctx.lineWidth = 1;
  for (const t of g.x.ticks) {
    const X = Math.round(g.px(t.value)) + 0.5;
    if (X < left || X > left + width) continue;
    ctx.strokeStyle = GRID;
    ctx.globalAlpha = t.major ? 1 : 0.5;
    ctx.beginPath(); ctx.moveTo(X, top); ctx.lineTo(X, top + height); ctx.stroke();
  }
  for (const t of g.y.ticks) {
    const Y = Math.round(g.py(t.value)) + 0.5;
    if (Y < top || Y > top + height) continue;
    ctx.strokeStyle = GRID;
    ctx.globalAlpha = t.major ? 1 : 0.5;
    ctx.beginPath(); ctx.moveTo(left, Y); ctx.lineTo(left + width, Y); ctx.stroke();
  }
  ctx.globalAlpha = 1;

  ctx.save();
  ctx.beginPath();
  ctx.rect(left, top, width, height);
  ctx.clip();
  p.draw(ctx, g);
  ctx.restore();

  ctx.strokeStyle = FRAME;
  ctx.lineWidth = 1;
  ctx.setLineDash([]);
  ctx.strokeRect(Math.round(left) + 0.5, Math.round(top) + 0.5, Math.round(width) - 1, Math.round(height) - 1);

  // Ticks and labels.
  ctx.fillStyle = INK;
  ctx.strokeStyle = INK_SOFT;
  ctx.font = font(TICK_PX);
  ctx.textAlign = 'right';
  let lastY = Infinity;
  for (const t of [...g.y.ticks].sort((a, b) => a.value - b.value)) {
    const Y = g.py(t.value);
    if (Y < top - 0.5 || Y > top + height + 0.5) continue;
    ctx.beginPath(); ctx.moveTo(left - (t.major ? 5 : 3), Math.round(Y) + 0.5); ctx.lineTo(left, Math.round(Y) + 0.5); ctx.stroke();
    if (!t.text || lastY - Y < TICK_PX + 2) continue; // skip a label that would touch the one below
    ctx.fillText(t.text, left - 7, Y + TICK_PX / 2 - 1);
    lastY = Y;
  }
  ctx.textAlign = 'center';
  let lastRight = -Infinity;
  for (const t of [...g.x.ticks].sort((a, b) => a.value - b.value)) {
    const X = g.px(t.value);
    if (X < left - 0.5 || X > left + width + 0.5) continue;
    ctx.beginPath(); ctx.moveTo(Math.round(X) + 0.5, top + height); ctx.lineTo(Math.round(X) + 0.5, top + height + (t.major ? 5 : 3)); ctx.stroke();
    if (!showX || !t.text) continue;
    const w = ctx.measureText(t.text).width;
    // Keep the label on the canvas: an end tick's label is shifted inwards rather than clipped.
    const cx = Math.min(Math.max(X, w / 2 + 2), ctx.canvas.width - w / 2 - 2);
    if (cx - w / 2 < lastRight + 6) continue;
    ctx.fillText(t.text, cx, top + height + 7 + TICK_PX);
    lastRight = cx + w / 2;
  }
  ctx.font = font(LABEL_PX);
  if (showX) ctx.fillText(g.x.title, left + width / 2, top + height + 12 + TICK_PX + LABEL_PX);
  ctx.save();
  ctx.translate(left - maxTickWidth(ctx, g.y) - 16, top + height / 2);
  ctx.rotate(-Math.PI / 2);
  ctx.font = font(LABEL_PX);
  ctx.textAlign = 'center';
  ctx.fillText(fitText(ctx, g.y.title, height), 0, 0);
  ctx.restore();
  if (p.note) {
    ctx.font = font(TICK_PX);
    ctx.textAlign = 'left';
    ctx.fillStyle = INK_SOFT;
    ctx.fillText(p.note, left + 6, top + 4 + TICK_PX);
  }
  if (p.overlay) {
    ctx.save();
    p.overlay(ctx, g);
    ctx.restore();
  }
}

/** Text shortened with an ellipsis to fit `max` pixels in the current font. */
export function fitText(ctx: Ctx, text: string, max: number): string {
  if (ctx.measureText(text).width <= max) return text;
  let s = text;
  while (s.length > 1 && ctx.measureText(s + '…').width > max) s = s.slice(0, -1);
  return s + '…';
}
