// Peak figures of a sampled curve (sim/analysis/peak.ts) against closed forms: a Gaussian has
// FWHM = 2√(2 ln 2)·σ and full width at 10 % = 2√(2 ln 10)·σ (standard results, e.g. IUPAC Gold Book
// "full width at half maximum"); a trapezoid is piecewise linear, so linear interpolation between
// samples gives its widths exactly.

import { describe, expect, it } from 'vitest';
import { crossings, peakFigures } from '../../sim/analysis/peak.js';

function sample(f: (x: number) => number, a: number, b: number, n: number): { x: number[]; y: number[] } {
  const x: number[] = [], y: number[] = [];
  for (let i = 0; i < n; i++) { const v = a + ((b - a) * i) / (n - 1); x.push(v); y.push(f(v)); }
  return { x, y };
}

describe('peak figures', () => {
  it('Gaussian: FWHM 2√(2 ln 2)σ, 10 % width 2√(2 ln 10)σ, centre and R = m/Δm', () => {
    const mu = 502, sigma = 1.3;
    const { x, y } = sample((v) => 0.8 * Math.exp(-0.5 * ((v - mu) / sigma) ** 2), 490, 514, 241);
    const p = peakFigures(x, y)!;
    // Linear interpolation on a grid of step h = 0.1 = σ/13: the crossing error is at most
    // (h²/8)·|y''|/|y'| at the crossing ≈ (0.01/8)/σ ≈ 1e-3 Th; 3e-3 allows for both sides.
    expect(p.fwhm_mz!).toBeCloseTo(2 * Math.sqrt(2 * Math.LN2) * sigma, 2);
    expect(Math.abs(p.width_10_mz! - 2 * Math.sqrt(2 * Math.log(10)) * sigma)).toBeLessThan(3e-3);
    expect(Math.abs(p.mz - mu)).toBeLessThan(1e-9); // symmetric samples about μ
    expect(p.resolution_50!).toBeCloseTo(mu / (2 * Math.sqrt(2 * Math.LN2) * sigma), 1);
    expect(p.resolution_10!).toBeCloseTo(mu / (2 * Math.sqrt(2 * Math.log(10)) * sigma), 1);
    expect(p.transmission).toBeCloseTo(0.8, 12);
  });

  it('trapezoid: widths exact under linear interpolation', () => {
    // Flat top 500..504 at 0.9, linear flanks 2 Th wide; samples every 0.5 Th on the corners.
    const f = (v: number) => (v < 498 || v > 506 ? 0 : v < 500 ? 0.45 * (v - 498) : v > 504 ? 0.45 * (506 - v) : 0.9);
    const { x, y } = sample(f, 490, 514, 49);
    const p = peakFigures(x, y)!;
    expect(p.low_50).toBeCloseTo(499, 12);
    expect(p.high_50).toBeCloseTo(505, 12);
    expect(p.fwhm_mz).toBeCloseTo(6, 12);
    expect(p.width_10_mz).toBeCloseTo(2 * (4 - 0.2), 12); // 10 % at 0.2 Th from each foot
    expect(p.mz).toBeCloseTo(502, 12);
    expect(p.resolution_50).toBeCloseTo(502 / 6, 12);
  });

  it('unbounded and empty curves', () => {
    const { x, y } = sample((v) => (v < 500 ? 0 : 1), 490, 510, 21);
    const p = peakFigures(x, y)!;
    expect(p.high_50).toBeNull();
    expect(p.fwhm_mz).toBeNull();
    expect(p.resolution_50).toBeNull();
    expect(p.low_50).toBeCloseTo(499.5, 12);
    expect(peakFigures([1, 2, 3], [0, 0, 0])).toBeNull();
    expect(crossings([1, 2, 3], [0, 1, 0], 0.5)).toEqual({ low: 1.5, high: 2.5 });
  });
});
