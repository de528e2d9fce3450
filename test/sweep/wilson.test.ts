// The 95 % Wilson score interval (E. B. Wilson, J. Am. Stat. Assoc. 22, 209 (1927)) against
// worked values computed independently of sim/analysis/wilson.ts.

import { describe, expect, it } from 'vitest';
import { wilsonInterval } from '../../sim/analysis/wilson.js';

describe('Wilson score interval', () => {
  it('Newcombe (1998), Stat. Med. 17, 857, Table I, method 3: 81/263 → 0.2553–0.3662; 15/148 → 0.0624–0.1605 (values from memory)', () => {
    // Four decimals as the table prints them: half a unit of the last digit.
    const [l1, h1] = wilsonInterval(81, 263);
    expect(Math.abs(l1 - 0.2553)).toBeLessThan(5e-5);
    expect(Math.abs(h1 - 0.3662)).toBeLessThan(5e-5);
    const [l2, h2] = wilsonInterval(15, 148);
    expect(Math.abs(l2 - 0.0624)).toBeLessThan(5e-5);
    expect(Math.abs(h2 - 0.1605)).toBeLessThan(5e-5);
  });

  it('k = 0 and k = n in closed form: [0, z²/(n + z²)] and [n/(n + z²), 1]', () => {
    // From the score equation |p̂ − p| = z·√(p(1 − p)/n) with p̂ = 0: p = z²/(n + z²) (solved by
    // hand); z = Φ⁻¹(0.975) = 1.959963984540054 (normal table, 16 digits).
    const z2 = 1.959963984540054 ** 2;
    for (const n of [20, 2000]) {
      expect(wilsonInterval(0, n)).toEqual([0, expect.closeTo(z2 / (n + z2), 14)]);
      expect(wilsonInterval(n, n)).toEqual([expect.closeTo(n / (n + z2), 14), 1]);
    }
    // Newcombe's Table I also has 0/20: upper end 0.1611.
    expect(Math.abs(wilsonInterval(0, 20)[1] - 0.1611)).toBeLessThan(5e-5);
  });

  it('the ends solve the score equation |p̂ − p| = z·√(p(1 − p)/n) (Wilson 1927, eq. of the limits)', () => {
    const z = 1.959963984540054;
    for (const [k, n] of [[1, 29], [370, 2000], [1999, 2000]]) {
      for (const p of wilsonInterval(k, n)) {
        expect(Math.abs(Math.abs(k / n - p) - z * Math.sqrt((p * (1 - p)) / n))).toBeLessThan(1e-14);
      }
    }
    // No trials: no information.
    expect(wilsonInterval(0, 0)).toEqual([0, 1]);
  });
});
