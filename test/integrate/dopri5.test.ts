// Adaptive Dormand–Prince 5(4) (sim/integrate/dopri5.ts) against exact solutions and odex 2.0.4.
import { describe, it, expect } from 'vitest';
import { Dopri5 } from '../../sim/integrate/dopri5.js';
import { odexIntegrate } from '../../sim/integrate/odex-reference.js';
import type { Derivative } from '../../sim/integrate/derivative.js';

const oscillator: Derivative = (_t, y, d) => { d[0] = y[1]; d[1] = -y[0]; };

function oscillatorRun(tol: number, tEnd: number) {
  const s = new Dopri5(2, { rtol: tol, atol: tol });
  const y = Float64Array.from([1, 0]);
  let denseErr = 0;
  const stats = s.integrate(oscillator, 0, y, tEnd, (t0, t1, _y, sol) => {
    for (const th of [0.25, 0.5, 0.75]) {
      const t = t0 + th * (t1 - t0);
      denseErr = Math.max(denseErr, Math.abs(sol.dense(0, t) - Math.cos(t)), Math.abs(sol.dense(1, t) + Math.sin(t)));
    }
  });
  const err = Math.hypot(y[0] - Math.cos(tEnd), y[1] + Math.sin(tEnd));
  return { err, denseErr, stats };
}

describe('Dopri5', () => {
  const tEnd = 20 * Math.PI; // ten periods of x'' = −x, exact x = cos t

  it('meets its tolerance on the harmonic oscillator, in proportion to the tolerance (HNW I, §II.4)', () => {
    const ratios: number[] = [];
    for (const tol of [1e-6, 1e-8, 1e-10, 1e-12]) {
      const { err, stats } = oscillatorRun(tol, tEnd);
      // Local control keeps each step's error below tol; over ~63 time units of a neutrally stable
      // problem the global error grows linearly, measured ≈ 20·tol. 100·tol is the acceptance line.
      expect(err).toBeLessThan(100 * tol);
      expect(stats.accepted).toBeGreaterThan(10);
      ratios.push(err / tol);
    }
    // Tolerance proportionality: err/tol stays within a factor 5 from 1e-6 to 1e-12.
    expect(Math.max(...ratios) / Math.min(...ratios)).toBeLessThan(5);
  });

  it('dense output is as accurate as the steps (4th-order continuous extension, HNW I, §II.6)', () => {
    const { err, denseErr } = oscillatorRun(1e-9, tEnd);
    // The interpolant's own error is O(h^5) like the step error; allow 10× the end-point error.
    expect(denseErr).toBeLessThan(10 * Math.max(err, 1e-9));
  });

  it('is exact for uniform acceleration (a 5th-order method integrates quadratics exactly)', () => {
    const g = 3.7;
    const f: Derivative = (_t, y, d) => { d[0] = y[1]; d[1] = g; };
    const s = new Dopri5(2, { rtol: 1e-6, atol: 1e-6 });
    const y = Float64Array.from([0.2, -1]);
    s.integrate(f, 0, y, 5, undefined);
    expect(Math.abs(y[0] - (0.2 - 5 + 0.5 * g * 25))).toBeLessThan(1e-12);
    expect(Math.abs(y[1] - (-1 + g * 5))).toBeLessThan(1e-12);
  });

  it('integrates backwards in time: y\' = −y from t = 2 to 0 recovers exp', () => {
    const f: Derivative = (_t, y, d) => { d[0] = -y[0]; };
    const s = new Dopri5(1, { rtol: 1e-11, atol: 1e-13 });
    const y = Float64Array.from([Math.exp(-2)]);
    s.integrate(f, 2, y, 0);
    expect(Math.abs(y[0] - 1)).toBeLessThan(1e-9); // relative tolerance 1e-11 × 2 time units, ×50 margin
  });

  it('agrees with odex 2.0.4 on a nonlinear orbit (Kepler, eccentricity 0.5, one period)', () => {
    // Kepler problem: r'' = −r/|r|³, start at perihelion (1 − e, 0) with speed √((1+e)/(1−e)); period 2π.
    const e = 0.5;
    const kepler: Derivative = (_t, y, d) => {
      const r3 = Math.pow(y[0] * y[0] + y[1] * y[1], 1.5);
      d[0] = y[2]; d[1] = y[3]; d[2] = -y[0] / r3; d[3] = -y[1] / r3;
    };
    const y0 = [1 - e, 0, 0, Math.sqrt((1 + e) / (1 - e))];
    const s = new Dopri5(4, { rtol: 1e-12, atol: 1e-12 });
    const y = Float64Array.from(y0);
    const stats = s.integrate(kepler, 0, y, 2 * Math.PI);
    const ref = odexIntegrate(kepler, 0, y0, 2 * Math.PI, { rtol: 1e-13, atol: 1e-13 }).y;
    for (let i = 0; i < 4; i++) expect(Math.abs(y[i] - ref[i])).toBeLessThan(1e-9);
    // After one period the orbit closes on its start (Kepler's laws): a check independent of odex.
    for (let i = 0; i < 4; i++) expect(Math.abs(y[i] - y0[i])).toBeLessThan(1e-9);
    expect(stats.rejected).toBeGreaterThanOrEqual(0);
  });

  it('reports a step budget that runs out', () => {
    const s = new Dopri5(2, { rtol: 1e-12, atol: 1e-12, maxSteps: 10 });
    expect(() => s.integrate(oscillator, 0, Float64Array.from([1, 0]), 100)).toThrow(/more than 10 steps/);
  });
});
