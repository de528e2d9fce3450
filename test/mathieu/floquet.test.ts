// Floquet analysis of the Mathieu equation (sim/mathieu/floquet.ts).
import { describe, it, expect } from 'vitest';
import { floquet, monodromy, type MonodromyMethod } from '../../sim/mathieu/floquet.js';

describe('monodromy matrix', () => {
  const points: [number, number][] = [[0, 0.3], [0.2, 0.6], [0.237, 0.706], [-0.1, 0.9], [1.2, 0.8], [3, 2], [0, 1.5]];

  it('has determinant 1 (Liouville: the Mathieu equation has no first-derivative term)', () => {
    for (const [a, q] of points) {
      const m = monodromy(a, q);
      expect(Math.abs(m.m11 * m.m22 - m.m12 * m.m21 - 1)).toBeLessThan(1e-10);
    }
  });

  it('trace from each of our integrators agrees with odex 2.0.4 to 1e-9', () => {
    const methods: MonodromyMethod[] = ['mathieu-rk4', 'rk4', 'dopri5'];
    for (const [a, q] of points) {
      const ref = monodromy(a, q, { method: 'odex', tol: 1e-13 }).trace;
      for (const method of methods) {
        expect(Math.abs(monodromy(a, q, { method }).trace - ref), `${method} a=${a} q=${q}`).toBeLessThan(1e-9);
      }
    }
  });

  it('for an even coefficient m11 = m22 (the two fundamental solutions are even and odd; McLachlan 1947, §4.70)', () => {
    for (const [a, q] of points) {
      const m = monodromy(a, q);
      expect(Math.abs(m.m11 - m.m22)).toBeLessThan(1e-9);
    }
  });
});

describe('β and its branch', () => {
  it('q = 0: u\'\' + a u = 0 has β = √a exactly, in every band (0–1, 1–2, 2–3)', () => {
    for (const beta of [0.3, 0.77, 1.25, 1.9, 2.4]) {
      const f = floquet(beta * beta, 0);
      expect(f.stable).toBe(true);
      expect(Math.abs((f.beta ?? NaN) - beta)).toBeLessThan(1e-9);
    }
  });

  it('matches the small-q series a = ν² + q²/(2(ν²−1)) + (5ν²+7)q⁴/(32(ν²−1)³(ν²−4)) + (9ν⁴+58ν²+29)q⁶/(64(ν²−1)⁵(ν²−4)(ν²−9)) (NIST DLMF 28.15.1; from memory)', () => {
    for (const nu of [0.35, 0.6, 1.4, 1.7, 2.5]) {
      for (const q of [0.05, 0.1]) {
        const n2 = nu * nu;
        const a = n2 + q ** 2 / (2 * (n2 - 1)) + ((5 * n2 + 7) * q ** 4) / (32 * (n2 - 1) ** 3 * (n2 - 4))
          + ((9 * n2 * n2 + 58 * n2 + 29) * q ** 6) / (64 * (n2 - 1) ** 5 * (n2 - 4) * (n2 - 9));
        const f = floquet(a, q);
        // Truncation O(q^8/(ν²−1)^7) ≲ 1e-8 at q = 0.1 and |ν² − 1| ≥ 0.5; dβ = da/(2ν).
        expect(f.stable).toBe(true);
        expect(Math.abs((f.beta ?? NaN) - nu), `ν=${nu} q=${q}`).toBeLessThan(2e-7);
      }
    }
  });

  it('stability is the same for q and −q (half-period shift) and β agrees', () => {
    for (const [a, q] of [[0.1, 0.5], [1.5, 0.4], [-0.05, 0.3]]) {
      const p = floquet(a, q), n = floquet(a, -q);
      expect(n.stable).toBe(p.stable);
      expect(Math.abs((n.beta ?? 0) - (p.beta ?? 0))).toBeLessThan(1e-10);
    }
  });

  it('unstable points get the integer rotation of their gap: 0 below a0, 1 between b1 and a1', () => {
    expect(floquet(-0.5, 0.5).stable).toBe(false);
    expect(floquet(-0.5, 0.5).rotation).toBe(0);
    expect(floquet(0.237, 0.706).stable).toBe(false); // just above the filter apex
    expect(floquet(1, 0.5).rotation).toBe(1); // b1(0.5) = 0.4707 < 1 < a1(0.5) = 1.4668 (A&S Table 20.1)
    expect(floquet(1, 0.5).beta).toBeNull();
  });

  it('Dehmelt small-q approximation β² ≈ a + q²/2 is within 1 % of the exact β for q < 0.2 (Dehmelt 1967; March & Todd 2005, §2.5)', () => {
    // Checked on a = 0 (RF only) and a small positive a. Close to the β = 0 edge (a ≈ −q²/2) the
    // relative error of any approximation diverges, so negative a is not part of this claim.
    for (const a of [0, 0.002, 0.005]) {
      for (let q = 0.01; q < 0.2; q += 0.01) {
        const exact = floquet(a, q).beta!;
        const approx = Math.sqrt(a + q * q / 2);
        expect(Math.abs(approx / exact - 1), `a=${a} q=${q}`).toBeLessThan(0.01);
      }
    }
  });
});
