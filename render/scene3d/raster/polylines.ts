// Anti-aliased polylines with a depth value per pixel. Coverage of a pixel centre is the analytic
// box-filtered distance to the segment (capsule of half-width hw): clamp(hw + 0.5 − d, 0, 1), the
// distance-based form of Gupta–Sproull anti-aliasing (S. Gupta, R. Sproull, "Filtering Edges for
// Gray-Scale Displays", SIGGRAPH 1981). One polyline keeps its maximum coverage per pixel so joints
// and self-crossings do not darken; then it is blended once into the line layer: "over" where it is
// nearer than what is there, "under" where it is behind (Porter & Duff, SIGGRAPH 1984).

import type { Layers } from './layers.js';

export class PolylinePainter {
  private nTouched = 0;
  /** Colours at the two ends of the next segment (vertex colours; see `flushOwnColors`). */
  private r0 = 0; private g0 = 0; private b0 = 0; private r1 = 0; private g1 = 0; private b1 = 0;
  constructor(private readonly L: Layers) {}

  /** Colours at the start and end of the next segments, interpolated along each. */
  endColors(r0: number, g0: number, b0: number, r1: number, g1: number, b1: number): void {
    this.r0 = r0; this.g0 = g0; this.b0 = b0; this.r1 = r1; this.g1 = g1; this.b1 = b1;
  }

  /** Add one segment of the current polyline (layer pixel coordinates, NDC depth). */
  segment(x0: number, y0: number, z0: number, x1: number, y1: number, z1: number, hw: number): void {
    const L = this.L, W = L.width, H = L.height;
    const cover = L.pCover, pdepth = L.pDepth, touched = L.touched, pcol = L.pColor;
    const { r0, g0, b0 } = this;
    const dr = this.r1 - r0, dg = this.g1 - g0, db = this.b1 - b0;
    const dx = x1 - x0, dy = y1 - y0;
    const len2 = dx * dx + dy * dy;
    const inv = len2 > 0 ? 1 / len2 : 0;
    const reach = hw + 1;
    const xMajor = Math.abs(dx) >= Math.abs(dy);
    // Walk the major axis; on each step cover the band of the minor axis around the line.
    const a0 = xMajor ? Math.min(x0, x1) : Math.min(y0, y1);
    const a1 = xMajor ? Math.max(x0, x1) : Math.max(y0, y1);
    const slope = xMajor ? (dx !== 0 ? dy / dx : 0) : (dy !== 0 ? dx / dy : 0);
    const span = reach * Math.sqrt(1 + slope * slope);
    const lo = Math.max(0, Math.floor(a0 - reach));
    const hi = Math.min((xMajor ? W : H) - 1, Math.ceil(a1 + reach));
    for (let m = lo; m <= hi; m++) {
      const cm = m + 0.5;
      const along = Math.min(a1, Math.max(a0, cm));
      const c = xMajor ? y0 + (along - x0) * slope : x0 + (along - y0) * slope;
      const n0 = Math.max(0, Math.floor(c - span));
      const n1 = Math.min((xMajor ? H : W) - 1, Math.ceil(c + span));
      for (let n = n0; n <= n1; n++) {
        const px = xMajor ? cm : n + 0.5, py = xMajor ? n + 0.5 : cm;
        let t = ((px - x0) * dx + (py - y0) * dy) * inv;
        t = t < 0 ? 0 : t > 1 ? 1 : t;
        const ex = px - (x0 + t * dx), ey = py - (y0 + t * dy);
        const cov = hw + 0.5 - Math.sqrt(ex * ex + ey * ey);
        if (cov <= 0) continue;
        const p = xMajor ? n * W + m : m * W + n;
        const cv = cov > 1 ? 1 : cov;
        if (cover[p] === 0) touched[this.nTouched++] = p;
        if (cv > cover[p]) {
          // The colour of the segment that covers the pixel most, at the nearest point of it.
          cover[p] = cv;
          pcol[3 * p] = r0 + t * dr; pcol[3 * p + 1] = g0 + t * dg; pcol[3 * p + 2] = b0 + t * db;
        }
        const z = z0 + t * (z1 - z0);
        if (z < pdepth[p]) pdepth[p] = z;
      }
    }
  }

  /** Blend the current polyline into the line layer with colour (r, g, b) and opacity, then reset. */
  flush(r: number, g: number, b: number, opacity: number): void {
    this.blend(r, g, b, opacity, false);
  }

  /** Blend the current polyline with the colours given by `endColors` along it, then reset. */
  flushOwnColors(opacity: number): void {
    this.blend(0, 0, 0, opacity, true);
  }

  private blend(r: number, g: number, b: number, opacity: number, own: boolean): void {
    const L = this.L, pcol = L.pColor;
    const cover = L.pCover, pdepth = L.pDepth, touched = L.touched;
    const lc = L.lColor, la = L.lAlpha, ld = L.lDepth;
    for (let i = 0; i < this.nTouched; i++) {
      const p = touched[i];
      if (own) { r = pcol[3 * p]; g = pcol[3 * p + 1]; b = pcol[3 * p + 2]; }
      const a = cover[p] * opacity;
      const z = pdepth[p];
      if (z <= ld[p]) {
        const k = 1 - a;
        lc[3 * p] = a * r + k * lc[3 * p];
        lc[3 * p + 1] = a * g + k * lc[3 * p + 1];
        lc[3 * p + 2] = a * b + k * lc[3 * p + 2];
        la[p] = a + k * la[p];
        ld[p] = z;
      } else {
        const k = (1 - la[p]) * a;
        lc[3 * p] += k * r; lc[3 * p + 1] += k * g; lc[3 * p + 2] += k * b;
        la[p] += k;
      }
      cover[p] = 0;
      pdepth[p] = Infinity;
    }
    this.nTouched = 0;
  }
}
