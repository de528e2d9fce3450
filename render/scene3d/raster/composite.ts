// Per-pixel composition of background, electrodes and polylines. Electrodes are opaque among
// themselves but drawn with opacity ELECTRODE_OPACITY over any trajectory they hide, so ions inside
// the rods or the trap stay visible (Porter & Duff "over", SIGGRAPH 1984).

import { BACKGROUND_BOTTOM, BACKGROUND_TOP } from '../palette.js';
import type { Layers } from './layers.js';

export const ELECTRODE_OPACITY = 0.6;

export function composite(L: Layers, out: Uint8ClampedArray): void {
  const { width: W, height: H, eColor, eCover, eDepth, lColor, lAlpha, lDepth } = L;
  const ae = ELECTRODE_OPACITY;
  for (let y = 0; y < H; y++) {
    const f = y / Math.max(1, H - 1);
    const br = BACKGROUND_TOP[0] + (BACKGROUND_BOTTOM[0] - BACKGROUND_TOP[0]) * f;
    const bg = BACKGROUND_TOP[1] + (BACKGROUND_BOTTOM[1] - BACKGROUND_TOP[1]) * f;
    const bb = BACKGROUND_TOP[2] + (BACKGROUND_BOTTOM[2] - BACKGROUND_TOP[2]) * f;
    for (let x = 0; x < W; x++) {
      const p = y * W + x;
      const ce = eCover[p];
      let r = ce * eColor[3 * p] + (1 - ce) * br;
      let g = ce * eColor[3 * p + 1] + (1 - ce) * bg;
      let b = ce * eColor[3 * p + 2] + (1 - ce) * bb;
      const la = lAlpha[p];
      if (la > 0) {
        const k = 1 - la;
        r = lColor[3 * p] + k * r; g = lColor[3 * p + 1] + k * g; b = lColor[3 * p + 2] + k * b;
        if (lDepth[p] > eDepth[p]) {
          const a = ce * ae;
          r = a * eColor[3 * p] + (1 - a) * r;
          g = a * eColor[3 * p + 1] + (1 - a) * g;
          b = a * eColor[3 * p + 2] + (1 - a) * b;
        }
      }
      out[4 * p] = r * 255 + 0.5; out[4 * p + 1] = g * 255 + 0.5; out[4 * p + 2] = b * 255 + 0.5; out[4 * p + 3] = 255;
    }
  }
}
