// The odex 2.0.4 wrapper (sim/integrate/odex-reference.ts) reproduces exact solutions.
import { describe, it, expect } from 'vitest';
import { odexIntegrate } from '../../sim/integrate/odex-reference.js';
import type { Derivative } from '../../sim/integrate/derivative.js';

describe('odexIntegrate', () => {
  it('solves x\'\' = −ω² x to its tolerance over three periods', () => {
    const w = 3;
    const f: Derivative = (_t, y, d) => { d[0] = y[1]; d[1] = -w * w * y[0]; };
    const t1 = (3 * 2 * Math.PI) / w + 0.4;
    const r = odexIntegrate(f, 0, [1, 0], t1, { rtol: 1e-12, atol: 1e-12 });
    // Extrapolation codes keep the global error near the tolerance on smooth problems; 1e-9 allows 1000×.
    expect(Math.abs(r.y[0] - Math.cos(w * t1))).toBeLessThan(1e-9);
    expect(Math.abs(r.y[1] + w * Math.sin(w * t1))).toBeLessThan(1e-9);
    expect(r.steps).toBeGreaterThan(0);
  });

  it('passes our Float64Array derivative through unchanged (y\' = y, exp)', () => {
    const f: Derivative = (_t, y, d) => { d[0] = y[0]; };
    const r = odexIntegrate(f, 0, [1], 1, { rtol: 1e-12, atol: 1e-12 });
    expect(Math.abs(r.y[0] - Math.E)).toBeLessThan(1e-10);
  });
});
