// Numbers printed on figures: the Freedman–Diaconis bin count and the exponential curve drawn with
// the run's fitted τ.

import { describe, expect, it } from 'vitest';
import { freedmanDiaconisBins } from '../../render/plot/kinds/histogram.js';
import { exponentialWithTau } from '../../render/plot/kinds/cooling.js';

describe('histogram bins', () => {
  it('follows Freedman & Diaconis (1981): h = 2·IQR·n^(−1/3)', () => {
    // 1..1000: quartiles 250.75 and 750.25 by linear interpolation (Hyndman & Fan 1996, type 7, the
    // R and numpy default), IQR 499.5, h = 999/10 = 99.9, so ceil(999 / 99.9) = 10 bins.
    const v = Float64Array.from({ length: 1000 }, (_, i) => i + 1);
    expect(freedmanDiaconisBins(v, 1, 1000)).toBe(10);
  });
});

describe('cooling curve', () => {
  it('recovers E∞ and A of E∞ + A·exp(−t/τ) exactly from noise-free samples (linear least squares)', () => {
    const tau = 150e-6;
    const t = Float64Array.from({ length: 100 }, (_, i) => i * 8e-6);
    const e = Float64Array.from(t, (x) => 0.0388 + 2.96 * Math.exp(-x / tau));
    const fit = exponentialWithTau(t, e, tau);
    // Tolerance: round-off of sums over 100 samples, ~1e-13 relative.
    expect(fit.floor).toBeCloseTo(0.0388, 10);
    expect(fit.amp).toBeCloseTo(2.96, 10);
  });
});
