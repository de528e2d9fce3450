// Fixed-step RK4 (sim/integrate/rk4.ts) against exact solutions and its theoretical order.
import { describe, it, expect } from 'vitest';
import { Rk4 } from '../../sim/integrate/rk4.js';
import type { Derivative } from '../../sim/integrate/derivative.js';

// Harmonic oscillator x'' = −ω² x; exact x = cos ωt, v = −ω sin ωt (any mechanics text).
const omega = 2.5;
const oscillator: Derivative = (_t, y, d) => { d[0] = y[1]; d[1] = -omega * omega * y[0]; };

function oscillatorError(steps: number, tEnd: number): number {
  const rk = new Rk4(2);
  const y = Float64Array.from([1, 0]);
  rk.integrate(oscillator, 0, y, tEnd, steps);
  return Math.hypot(y[0] - Math.cos(omega * tEnd), (y[1] + omega * Math.sin(omega * tEnd)) / omega);
}

describe('Rk4', () => {
  it('follows the harmonic oscillator x = cos ωt over ten periods', () => {
    const tEnd = (10 * 2 * Math.PI) / omega;
    // On x'' = −ω²x one RK4 step multiplies the phasor by R(iθ) = Σ_{k≤4} (iθ)^k/k!, θ = ωh
    // (stability function, HNW I, §IV.2): |R| = 1 − θ^6/144 + …, arg R = θ − θ^5/120 + …, so after
    // N steps the error is dominated by the phase lag N θ^5/120. 200 steps per period, 10 periods:
    const steps = 2000;
    const theta = (omega * tEnd) / steps;
    const predicted = (steps * theta ** 5) / 120; // ≈ 5.1e-7
    const err = oscillatorError(steps, tEnd);
    // The next terms are O(θ^2) ≈ 1e-3 relative; 2 % covers them and the small amplitude error.
    expect(Math.abs(err / predicted - 1)).toBeLessThan(0.02);
  });

  it('is fourth order: halving the step divides the error by about 16 (HNW I, Theorem II.3.4)', () => {
    const tEnd = 3;
    const e1 = oscillatorError(60, tEnd);
    const e2 = oscillatorError(120, tEnd);
    const e3 = oscillatorError(240, tEnd);
    // Asymptotically e(h)/e(h/2) = 2^4 = 16; at ωh ≈ 0.1 the O(h^5) term shifts it by a few percent,
    // so a band of 14.5–17.5 (±10 %) is tight enough to reject order 3 (8) or 5 (32).
    expect(e1 / e2).toBeGreaterThan(14.5);
    expect(e1 / e2).toBeLessThan(17.5);
    expect(e2 / e3).toBeGreaterThan(14.5);
    expect(e2 / e3).toBeLessThan(17.5);
  });

  it('is exact for uniform acceleration x = x0 + v0 t + g t²/2 (RK4 integrates polynomials of degree ≤ 4 exactly)', () => {
    const g = -9.80665;
    const f: Derivative = (_t, y, d) => { d[0] = y[1]; d[1] = g; };
    const rk = new Rk4(2);
    const y = Float64Array.from([1.5, 12]);
    rk.integrate(f, 0, y, 2.4, 7);
    // Only rounding remains: a few ulps of the O(10) values.
    expect(y[0]).toBeCloseTo(1.5 + 12 * 2.4 + 0.5 * g * 2.4 * 2.4, 12);
    expect(y[1]).toBeCloseTo(12 + g * 2.4, 12);
  });

  it('refuses a non-integer step count or dimension', () => {
    expect(() => new Rk4(0)).toThrow(RangeError);
    expect(() => new Rk4(2).integrate(oscillator, 0, new Float64Array(2), 1, 2.5)).toThrow(RangeError);
  });
});
