// Structural checks of rendered PNGs: size, how many pixels are near a colour inside a rectangle.
// Not golden images: fonts and anti-aliasing differ across machines.

import { loadImage, createCanvas } from '@napi-rs/canvas';
import { hexRgb } from '../../render/common/palette.js';

export interface Raster { width: number; height: number; data: Uint8ClampedArray }

export async function decodePng(bytes: Buffer): Promise<Raster> {
  const img = await loadImage(bytes);
  const c = createCanvas(img.width, img.height);
  const ctx = c.getContext('2d');
  ctx.drawImage(img, 0, 0);
  const d = ctx.getImageData(0, 0, img.width, img.height);
  return { width: img.width, height: img.height, data: d.data as Uint8ClampedArray };
}

/** Pixels within `tol` (per channel) of `hex` inside [x0, x1) × [y0, y1). */
export function countColor(r: Raster, hex: string, tol = 12, x0 = 0, y0 = 0, x1 = r.width, y1 = r.height): number {
  const [R, G, B] = hexRgb(hex);
  let n = 0;
  for (let y = y0; y < y1; y++) {
    for (let x = x0; x < x1; x++) {
      const i = 4 * (y * r.width + x);
      if (Math.abs(r.data[i] - R) <= tol && Math.abs(r.data[i + 1] - G) <= tol && Math.abs(r.data[i + 2] - B) <= tol) n++;
    }
  }
  return n;
}

/** Pixels that differ from white and from the panel background inside a rectangle. */
export function countInk(r: Raster, x0: number, y0: number, x1: number, y1: number): number {
  let n = 0;
  for (let y = y0; y < y1; y++) {
    for (let x = x0; x < x1; x++) {
      const i = 4 * (y * r.width + x);
      if (r.data[i] + r.data[i + 1] + r.data[i + 2] < 3 * 200) n++;
    }
  }
  return n;
}
