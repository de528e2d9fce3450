// Per-pixel min/max decimation against its definition (M4 aggregation: Jugel et al., PVLDB 7(10),
// 2014): per pixel column the first, last, minimum and maximum samples survive, so the rasterised
// polyline covers the same pixels; at most 4 vertices per column.

import { describe, expect, it } from 'vitest';
import { Decimator } from '../../render/plot/decimate.js';

function series(n: number) {
  const t = new Float64Array(n), y = new Float64Array(n);
  // Secular + micromotion shape with a little deterministic jitter (counter hash, not Math.random).
  for (let i = 0; i < n; i++) {
    t[i] = i * 1e-9;
    const h = Math.sin(i * 12.9898) * 43758.5453;
    y[i] = Math.cos(2e6 * t[i]) * (1 - 0.25 * Math.cos(7.5e6 * t[i])) + 0.01 * (h - Math.floor(h));
  }
  return { t, y };
}

describe('Decimator (M4)', () => {
  it('keeps each column\'s first, last, min and max exactly, with ≤ 4 vertices per column', () => {
    const n = 200_000, width = 640;
    const { t, y } = series(n);
    const bx = width / (t[n - 1] - t[0]), ax = -t[0] * bx;
    const d = new Decimator();
    const m = d.run(t, y, 0, n, ax, bx);
    const cols = new Map<number, number[]>();
    for (let k = 0; k < m; k++) {
      const c = Math.min(width, Math.floor(d.xy[2 * k]));
      (cols.get(c) ?? cols.set(c, []).get(c)!).push(d.xy[2 * k + 1]);
    }
    const truth = new Map<number, { min: number; max: number; first: number; last: number }>();
    for (let i = 0; i < n; i++) {
      const c = Math.floor(ax + bx * t[i]);
      const e = truth.get(c);
      if (!e) truth.set(c, { min: y[i], max: y[i], first: y[i], last: y[i] });
      else { e.min = Math.min(e.min, y[i]); e.max = Math.max(e.max, y[i]); e.last = y[i]; }
    }
    expect(m).toBeLessThanOrEqual(4 * truth.size);
    for (const [c, e] of truth) {
      const v = cols.get(c)!;
      expect(Math.min(...v)).toBe(e.min);
      expect(Math.max(...v)).toBe(e.max);
      expect(v[0]).toBe(e.first);
      expect(v[v.length - 1]).toBe(e.last);
    }
  });

  it('passes a short series through unchanged (one sample per column)', () => {
    const t = Float64Array.from([0, 1, 2, 3]), y = Float64Array.from([1, -1, 2, 0]);
    const d = new Decimator();
    const m = d.run(t, y, 0, 4, 0, 100);
    expect(m).toBe(4);
    expect(Array.from({ length: 4 }, (_, k) => d.xy[2 * k + 1])).toEqual([1, -1, 2, 0]);
  });
});
