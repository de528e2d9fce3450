// Text and 2D furniture drawn over the software-rendered image with @napi-rs/canvas: title and
// stage chain, colour bar or legend, electrode names and voltages on leader lines, axis triad,
// scale-bar label and the provenance footer.

import { createCanvas, ImageData, type SKRSContext2D } from '@napi-rs/canvas';
import * as THREE from 'three';
import { AXIS_COLORS, BACKGROUND_TOP, INK, INK_SOFT, cssColor } from './palette.js';
import type { Legend } from './trajectoryColors.js';

export const FONT = '"DejaVu Sans", "Liberation Sans", sans-serif';

export interface LabelContent {
  title: string;
  subtitle: string;
  legend: Legend;
  footerLeft: string;
  footerRight: string;
  scaleBarText: string;
  /** Scale bar ends on the image, pixels. */
  scaleBarPx: [number, number, number, number];
  camera: THREE.Camera;
  /** Electrode labels with the pixel their leader line points at. */
  electrodes?: { text: string; x: number; y: number }[];
}

function triad(ctx: SKRSContext2D, camera: THREE.Camera, ox: number, oy: number, len: number): void {
  const view = new THREE.Matrix4().extractRotation(camera.matrixWorldInverse);
  const axes = ['x', 'y', 'z'];
  // Draw far axes first so the nearest sits on top.
  const items = axes.map((name, i) => {
    const v = new THREE.Vector3().setComponent(i, 1).applyMatrix4(view);
    return { name, i, v };
  }).sort((a, b) => a.v.z - b.v.z);
  ctx.lineCap = 'round';
  for (const { name, i, v } of items) {
    const ex = ox + v.x * len, ey = oy - v.y * len;
    ctx.strokeStyle = cssColor(AXIS_COLORS[i]);
    ctx.lineWidth = 2.5;
    ctx.beginPath(); ctx.moveTo(ox, oy); ctx.lineTo(ex, ey); ctx.stroke();
    const r = Math.hypot(v.x, v.y);
    const lx = r > 0.15 ? ox + v.x * (len + 11) / 1 : ex + 8, ly = r > 0.15 ? oy - v.y * (len + 11) : ey - 8;
    ctx.fillStyle = cssColor(AXIS_COLORS[i]);
    ctx.font = `bold 13px ${FONT}`;
    ctx.textAlign = 'center';
    ctx.textBaseline = 'middle';
    ctx.fillText(name, lx, ly);
  }
  ctx.fillStyle = cssColor(INK);
  ctx.beginPath(); ctx.arc(ox, oy, 2.5, 0, 2 * Math.PI); ctx.fill();
}

/** Draws the legend right-aligned at `right`; returns its width in pixels. */
function legend(ctx: SKRSContext2D, lg: Legend, right: number, top: number): number {
  ctx.textBaseline = 'middle';
  ctx.textAlign = 'left';
  ctx.font = `12px ${FONT}`;
  if (lg.kind === 'ramp') return colorBar(ctx, lg, right, top);
  // Swatches in one row, right-aligned; measured first so nothing overlaps.
  const items = lg.entries.map((e) => ({ e, text: `${e.label} (${e.count})` }));
  const widths = items.map((it) => ctx.measureText(it.text).width + 28);
  const total = widths.reduce((a, b) => a + b, 0);
  let x = right - total;
  ctx.fillStyle = cssColor(INK);
  ctx.font = `bold 12px ${FONT}`;
  ctx.fillText(lg.title === 'fate' ? 'ion fate' : lg.title, x, top + 6);
  ctx.font = `12px ${FONT}`;
  items.forEach((it, i) => {
    const y = top + 24;
    ctx.strokeStyle = cssColor(it.e.color);
    ctx.lineWidth = 3;
    ctx.beginPath(); ctx.moveTo(x, y); ctx.lineTo(x + 16, y); ctx.stroke();
    ctx.fillStyle = cssColor(INK);
    ctx.fillText(it.text, x + 21, y);
    x += widths[i];
  });
  return total;
}

/** Round tick step (1, 2 or 5 × 10^n) giving about `n` intervals over `span`. */
export function tickStep(span: number, n: number): number {
  const raw = span / n, p = 10 ** Math.floor(Math.log10(raw)), m = raw / p;
  return (m >= 5 ? 5 : m >= 2 ? 2 : 1) * p;
}

/** Horizontal colour bar with its title and unit, round ticks and the end values; returns its width. */
function colorBar(ctx: SKRSContext2D, lg: Extract<Legend, { kind: 'ramp' }>, right: number, top: number): number {
  const w = 240, h = 11, x = right - w, y = top + 16;
  const tmp = [0, 0, 0];
  for (let i = 0; i < w; i++) {
    ctx.fillStyle = cssColor(lg.map(i / (w - 1), tmp));
    ctx.fillRect(x + i, y, 1, h);
  }
  ctx.strokeStyle = cssColor(INK_SOFT); ctx.lineWidth = 1; ctx.strokeRect(x + 0.5, y + 0.5, w - 1, h - 1);
  ctx.fillStyle = cssColor(INK);
  ctx.font = `bold 12px ${FONT}`;
  ctx.textAlign = 'left';
  ctx.textBaseline = 'middle';
  ctx.fillText(lg.unit ? `${lg.title} (${lg.unit})` : lg.title, x, top + 5);
  const span = lg.max - lg.min;
  ctx.font = `11px ${FONT}`;
  ctx.textBaseline = 'top';
  ctx.strokeStyle = cssColor(INK);
  if (span > 0) {
    const step = tickStep(span, 4);
    const digits = Math.max(0, -Math.floor(Math.log10(step) + 1e-9));
    let lastRight = -Infinity;
    for (let v = Math.ceil(lg.min / step - 1e-9) * step; v <= lg.max + 1e-9 * span; v += step) {
      const tx = x + ((v - lg.min) / span) * (w - 1);
      ctx.beginPath(); ctx.moveTo(tx + 0.5, y + h); ctx.lineTo(tx + 0.5, y + h + 4); ctx.stroke();
      const atTop = Math.abs(v - lg.max) < 1e-6 * span;
      const text = `${atTop && lg.clippedTop ? '≥ ' : ''}${v.toFixed(digits)}`;
      const tw = ctx.measureText(text).width;
      const left = Math.min(x + w - tw, Math.max(x, tx - tw / 2));
      if (left < lastRight + 6) continue;
      ctx.textAlign = 'left';
      ctx.fillText(text, left, y + h + 5);
      lastRight = left + tw;
    }
    if (lg.clippedTop && Math.abs(lg.max / step - Math.round(lg.max / step)) > 1e-6) {
      // The bar's top is not a round tick: say where clipping starts at the right end.
      ctx.textAlign = 'right';
      ctx.fillText(`≥ ${lg.max.toPrecision(3)}`, x + w, y + h + 18);
    }
  }
  return w;
}

/**
 * Electrode names and voltages on leader lines: each text sits up and right of the point it names
 * (left where the image ends), moved up past any label already placed so none overlap.
 */
function electrodeLabels(ctx: SKRSContext2D, items: { text: string; x: number; y: number }[], width: number, topLimit: number): void {
  ctx.font = `12px ${FONT}`;
  const placed: { x: number; y: number; w: number; h: number }[] = [];
  const h = 18;
  const order = items.map((it, i) => i).sort((a, b) => items[a].y - items[b].y || items[a].x - items[b].x);
  for (const i of order) {
    const it = items[i];
    const w = ctx.measureText(it.text).width + 12;
    let bx = it.x + 26, by = it.y - 40 - h;
    if (bx + w > width - 16) bx = it.x - 26 - w;
    const hits = (y: number) => placed.some((p) => bx < p.x + p.w + 4 && bx + w + 4 > p.x && y < p.y + p.h + 3 && y + h + 3 > p.y);
    while (hits(by) && by > topLimit) by -= h + 3;
    if (by < topLimit) {
      by = it.y + 30;
      while (hits(by)) by += h + 3;
    }
    placed.push({ x: bx, y: by, w, h });
    const ex = bx < it.x ? bx + w : bx, ey = by + h / 2;
    ctx.strokeStyle = 'rgba(36,38,43,0.55)';
    ctx.lineWidth = 1;
    ctx.beginPath(); ctx.moveTo(it.x, it.y); ctx.lineTo(ex, ey); ctx.stroke();
    ctx.fillStyle = cssColor(INK);
    ctx.beginPath(); ctx.arc(it.x, it.y, 2.2, 0, 2 * Math.PI); ctx.fill();
    const [r, g, b] = BACKGROUND_TOP.map((c) => Math.round(255 * c));
    ctx.fillStyle = `rgba(${r},${g},${b},0.88)`;
    ctx.strokeStyle = 'rgba(36,38,43,0.35)';
    ctx.beginPath(); ctx.roundRect(bx + 0.5, by + 0.5, w, h, 3); ctx.fill(); ctx.stroke();
    ctx.fillStyle = cssColor(INK);
    ctx.textAlign = 'left';
    ctx.textBaseline = 'middle';
    ctx.fillText(it.text, bx + 6, by + h / 2 + 0.5);
  }
}

/** Set the largest font size ≤ px (down to 8) at which `text` fits in `room` pixels; returns it. */
function fitFont(ctx: SKRSContext2D, text: string, room: number, px: number, weight = ''): number {
  let size = px;
  ctx.font = `${weight}${size}px ${FONT}`;
  while (size > 8 && ctx.measureText(text).width > room) {
    size -= 0.5;
    ctx.font = `${weight}${size}px ${FONT}`;
  }
  return size;
}

function fmt(v: number): string {
  return Math.abs(v) >= 100 ? v.toFixed(0) : v.toPrecision(3);
}

/** Paint `rgba` (width × height) and the labels; return the PNG bytes. */
export function drawLabels(rgba: Uint8ClampedArray, width: number, height: number, c: LabelContent): Buffer {
  const canvas = createCanvas(width, height);
  const ctx = canvas.getContext('2d');
  ctx.putImageData(new ImageData(rgba, width, height), 0, 0);

  ctx.fillStyle = cssColor(INK);
  ctx.textBaseline = 'alphabetic';
  ctx.textAlign = 'left';
  const legendW = legend(ctx, c.legend, width - 24, 18);
  ctx.fillStyle = cssColor(INK);
  ctx.textAlign = 'left';
  ctx.textBaseline = 'alphabetic';
  fitFont(ctx, c.title, width - 48 - legendW - 24, 22, 'bold ');
  ctx.fillText(c.title, 24, 36);
  ctx.fillStyle = cssColor(INK_SOFT);
  fitFont(ctx, c.subtitle, width - 48, 13);
  ctx.fillText(c.subtitle, 24, 58);

  // Scale bar label under the bar's midpoint.
  const [x0, y0, x1, y1] = c.scaleBarPx;
  ctx.fillStyle = cssColor(INK);
  ctx.font = `12px ${FONT}`;
  ctx.textAlign = 'center';
  ctx.textBaseline = 'top';
  ctx.fillText(c.scaleBarText, (x0 + x1) / 2, Math.max(y0, y1) + 7);

  if (c.electrodes?.length) electrodeLabels(ctx, c.electrodes, width, 74);
  triad(ctx, c.camera, 56, height - 80, 30);

  ctx.strokeStyle = 'rgba(36,38,43,0.18)';
  ctx.lineWidth = 1;
  ctx.beginPath(); ctx.moveTo(24, height - 34.5); ctx.lineTo(width - 24, height - 34.5); ctx.stroke();
  ctx.fillStyle = cssColor(INK_SOFT);
  ctx.textBaseline = 'alphabetic';
  const room = width - 48;
  const leftPx = fitFont(ctx, c.footerLeft, room, 11);
  ctx.textAlign = 'left';
  ctx.fillText(c.footerLeft, 24, height - 15);
  ctx.font = `11px ${FONT}`;
  const together = ctx.measureText(c.footerLeft).width + ctx.measureText(c.footerRight).width + 24 <= room && leftPx === 11;
  // Footer notes go on their own line above the rule when they would run into the provenance.
  fitFont(ctx, c.footerRight, together ? room : room - 120, 11);
  ctx.textAlign = 'right';
  ctx.fillText(c.footerRight, width - 24, together ? height - 15 : height - 42);
  return canvas.toBuffer('image/png');
}
