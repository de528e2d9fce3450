// Stability edges found from the monodromy matrix vs tabulated Mathieu characteristic values.
// Reference: test/reference/mathieu_characteristic_values.csv — scipy.special.mathieu_a / mathieu_b
// (SciPy 1.17.1), cross-checked against Abramowitz & Stegun, Handbook of Mathematical Functions,
// Table 20.1. Required agreement: 1e-6 (issue 2).
import { describe, it, expect } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { a0, b1, a1, b2 } from '../../sim/mathieu/boundaries.js';
import { halfTrace } from '../../sim/mathieu/floquet.js';
import { repoRoot } from '../bench/cbuild.js';


interface Row { q: number; a0: number; b1: number; a1: number; b2: number }

function table(): Row[] {
  const text = readFileSync(join(repoRoot(), 'test/reference/mathieu_characteristic_values.csv'), 'utf8');
  const lines = text.split('\n').filter((l) => l.trim() !== '' && !l.startsWith('#'));
  const [head, ...rows] = lines;
  expect(head.trim()).toBe('q,a0,b1,a1,b2');
  return rows.map((l) => {
    const [q, x0, y1, x1, y2] = l.split(',').map(Number);
    return { q, a0: x0, b1: y1, a1: x1, b2: y2 };
  });
}

describe('Mathieu characteristic values from the monodromy matrix', () => {
  const rows = table();

  it('the table covers q = 0 … 2 in steps of 0.01', () => {
    expect(rows.length).toBe(201);
    expect(rows[0].q).toBe(0);
    expect(rows[200].q).toBe(2);
  });

  it('a0, b1, a1, b2 match the table to 1e-6 at every tabulated q', () => {
    let worst = 0;
    for (const r of rows) {
      const got = [a0(r.q), b1(r.q), a1(r.q), b2(r.q)];
      const want = [r.a0, r.b1, r.a1, r.b2];
      for (let i = 0; i < 4; i++) {
        worst = Math.max(worst, Math.abs(got[i] - want[i]));
        expect(Math.abs(got[i] - want[i]), `q=${r.q} curve ${['a0', 'b1', 'a1', 'b2'][i]}`).toBeLessThan(1e-6);
      }
    }
    // The table carries 12 decimals; the root finder aims at 1e-13 and RK4 at ~1e-12 in the trace.
    expect(worst).toBeLessThan(1e-9);
  });

  it('the tabulated values lie on |tr M| = 2: tr/2 = +1 at a0 and b2, −1 at b1 and a1 (Floquet theory)', () => {
    for (const r of rows.filter((_, i) => i % 20 === 10)) {
      // |d(tr/2)/da| is at most ~3 here, so the table's 1e-12 rounding moves tr/2 by < 1e-11.
      expect(Math.abs(halfTrace(r.a0, r.q) - 1)).toBeLessThan(1e-9);
      expect(Math.abs(halfTrace(r.b1, r.q) + 1)).toBeLessThan(1e-9);
      expect(Math.abs(halfTrace(r.a1, r.q) + 1)).toBeLessThan(1e-9);
      expect(Math.abs(halfTrace(r.b2, r.q) - 1)).toBeLessThan(1e-9);
    }
  });

  it('edges depend on |q| only: q → −q keeps the band edges and only swaps the names a1 ↔ b1 (A&S 20.2.15)', () => {
    // Our edges are named for q ≥ 0 and take |q|: the stability bands at −q are those at q.
    const q = 0.37;
    expect(a0(-q)).toBeCloseTo(a0(q), 12);
    expect(b2(-q)).toBeCloseTo(b2(q), 12);
    expect(b1(-q)).toBeCloseTo(b1(q), 12);
    expect(a1(-q)).toBeCloseTo(a1(q), 12);
  });
});
