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
  it('recovers A of E∞ + A·exp(−t/τ) exactly from noise-free samples with the plateau given', () => {
    const tau = 150e-6;
    const t = Float64Array.from({ length: 100 }, (_, i) => i * 8e-6);
    const e = Float64Array.from(t, (x) => 0.0388 + 2.96 * Math.exp(-x / tau));
    const fit = exponentialWithTau(t, e, tau, 0.0388);
    // Tolerance: round-off of sums over 100 samples, ~1e-13 relative.
    expect(fit.floor).toBe(0.0388);
    expect(fit.amp).toBeCloseTo(2.96, 10);
  });
  it('takes the plateau as the mean of the last 20 % of samples when none is given (sim/analysis/cooling.ts rule)', () => {
    // After 5τ the excess is e^−5 ≈ 0.7 % of A: the tail mean sits within that of E∞.
    const tau = 100e-6;
    const t = Float64Array.from({ length: 200 }, (_, i) => i * 5e-6); // 10 τ
    const e = Float64Array.from(t, (x) => 0.05 + 3 * Math.exp(-x / tau));
    const fit = exponentialWithTau(t, e, tau);
    expect(Math.abs(fit.floor - 0.05)).toBeLessThan(3 * Math.exp(-8));
    expect(fit.amp).toBeCloseTo(3, 2);
  });
});
