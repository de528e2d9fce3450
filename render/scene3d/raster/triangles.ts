// Triangle rasteriser with a depth buffer: edge functions over the triangle's bounding box, sample
// at pixel centres, top-left fill rule (J. Pineda, "A Parallel Algorithm for Polygon Rasterization",
// SIGGRAPH 1988). Depth and Gouraud intensity are interpolated with the screen-space barycentrics,
// which is exact for NDC depth (it is affine in screen space after the perspective divide).

import type { Layers } from './layers.js';

/** Rasterise one triangle into the supersampled electrode layer. Coordinates in layer pixels. */
export function rasterTriangle(
  L: Layers,
  ax: number, ay: number, az: number, ai: number,
  bx: number, by: number, bz: number, bi: number,
  cx: number, cy: number, cz: number, ci: number,
  r: number, g: number, b: number,
): void {
  let area = (bx - ax) * (cy - ay) - (by - ay) * (cx - ax);
  if (!(Math.abs(area) > 1e-12)) return;
  if (area < 0) {
    // Two-sided: swap b and c so the winding is positive.
    let t = bx; bx = cx; cx = t; t = by; by = cy; cy = t; t = bz; bz = cz; cz = t; t = bi; bi = ci; ci = t;
    area = -area;
  }
  const W = L.ssW, H = L.ssH;
  const minX = Math.max(0, Math.floor(Math.min(ax, bx, cx)));
  const maxX = Math.min(W - 1, Math.ceil(Math.max(ax, bx, cx)));
  const minY = Math.max(0, Math.floor(Math.min(ay, by, cy)));
  const maxY = Math.min(H - 1, Math.ceil(Math.max(ay, by, cy)));
  if (minX > maxX || minY > maxY) return;
  const inv = 1 / area;
  // Edge e0 opposite a (b→c), e1 opposite b (c→a), e2 opposite c (a→b): e(p) = A·px + B·py + C.
  const A0 = by - cy, B0 = cx - bx, C0 = bx * cy - by * cx;
  const A1 = cy - ay, B1 = ax - cx, C1 = cx * ay - cy * ax;
  const A2 = ay - by, B2 = bx - ax, C2 = ax * by - ay * bx;
  // Top-left rule: pixels exactly on a right or bottom edge belong to the neighbour.
  const o0 = A0 > 0 || (A0 === 0 && B0 < 0) ? 0 : -1e-9;
  const o1 = A1 > 0 || (A1 === 0 && B1 < 0) ? 0 : -1e-9;
  const o2 = A2 > 0 || (A2 === 0 && B2 < 0) ? 0 : -1e-9;
  const depth = L.sDepth, color = L.sColor;
  for (let y = minY; y <= maxY; y++) {
    const py = y + 0.5;
    const px = minX + 0.5;
    let w0 = A0 * px + B0 * py + C0, w1 = A1 * px + B1 * py + C1, w2 = A2 * px + B2 * py + C2;
    for (let x = minX; x <= maxX; x++, w0 += A0, w1 += A1, w2 += A2) {
      if (w0 + o0 < 0 || w1 + o1 < 0 || w2 + o2 < 0) continue;
      const l0 = w0 * inv, l1 = w1 * inv, l2 = w2 * inv;
      const z = l0 * az + l1 * bz + l2 * cz;
      const s = y * W + x;
      if (z >= depth[s] || z < -1 || z > 1) continue;
      depth[s] = z;
      const k = l0 * ai + l1 * bi + l2 * ci;
      color[3 * s] = Math.min(1, r * k);
      color[3 * s + 1] = Math.min(1, g * k);
      color[3 * s + 2] = Math.min(1, b * k);
    }
  }
}
