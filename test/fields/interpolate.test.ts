// The field interpolant (sim/fields/interpolate.ts): cubic Hermite with fourth-order node
// derivatives reproduces every polynomial of degree ≤ 3 per coordinate exactly (Fornberg, Math.
// Comp. 51 (1988): the five-point differences are exact to degree 4), its gradient is continuous
// across cell faces, and equals the finite difference of its value.

import { describe, expect, it } from 'vitest';
import { GridInterpolant } from '../../sim/fields/interpolate.js';
import { extendIntoElectrodes } from '../../sim/fields/extrapolate.js';
import type { SolvedGrid } from '../../sim/fields/problem.js';

function sample(grid: SolvedGrid, f: (x: number, y: number, z: number) => number): Float64Array {
  const [n0, n1, n2] = grid.shape;
  const out = new Float64Array(n0 * n1 * n2);
  for (let k = 0; k < n2; k++) for (let j = 0; j < n1; j++) for (let i = 0; i < n0; i++) {
    const [a, b, c] = [grid.origin[0] + i * grid.spacing, grid.origin[1] + j * grid.spacing, grid.origin[2] + k * grid.spacing];
    out[i + n0 * (j + n1 * k)] = f(a, b, c);
  }
  return out;
}

// Random points from a fixed linear congruential sequence (Numerical Recipes' ranqd1 constants).
function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => { s = (1664525 * s + 1013904223) >>> 0; return s / 2 ** 32; };
}

const out = new Float64Array(4);
// Round-off only: values of order 1 summed over 36 or 216 weights of order 1 in double precision.
const EXACT = 1e-11;

describe('bicubic and tricubic interpolation', () => {
  it('planar: exact for a cubic in x and y, value and gradient, up to the grid edge', () => {
    const grid: SolvedGrid = { symmetry: 'planar', origin: [-1, -0.5, 0], spacing: 0.1, shape: [21, 13, 1], mirror: [] };
    const f = (x: number, y: number) => 0.3 + x - 2 * y + x * x * y - 0.7 * y * y * y + 0.2 * x * x * x + x * y;
    const fx = (x: number, y: number) => 1 + 2 * x * y + 0.6 * x * x + y;
    const fy = (x: number, y: number) => -2 + x * x - 2.1 * y * y + x;
    const it = new GridInterpolant(grid, sample(grid, f));
    const rnd = lcg(1);
    for (let n = 0; n < 500; n++) {
      const x = -1 + 2 * rnd(), y = -0.5 + 1.2 * rnd();
      expect(it.evaluate(x, y, 0, out)).toBe(true);
      expect(Math.abs(out[0] - f(x, y))).toBeLessThan(EXACT);
      expect(Math.abs(out[1] - fx(x, y))).toBeLessThan(1e-9);
      expect(Math.abs(out[2] - fy(x, y))).toBeLessThan(1e-9);
      expect(out[3]).toBe(0);
    }
    expect(it.evaluate(1.2, 0, 0, out)).toBe(false);
  });

  it('3D: exact for a tricubic polynomial with cross terms', () => {
    const grid: SolvedGrid = { symmetry: 'none', origin: [0, 0, 0], spacing: 0.25, shape: [9, 8, 10], mirror: [] };
    const f = (x: number, y: number, z: number) => x * y * z + z * z * z - x * x * z + 0.5 * y * y + 2;
    const g = (x: number, y: number, z: number) => [y * z - 2 * x * z, x * z + y, x * y + 3 * z * z - x * x];
    const it = new GridInterpolant(grid, sample(grid, f));
    const rnd = lcg(2);
    for (let n = 0; n < 300; n++) {
      const x = 2 * rnd(), y = 1.75 * rnd(), z = 2.25 * rnd();
      expect(it.evaluate(x, y, z, out)).toBe(true);
      expect(Math.abs(out[0] - f(x, y, z))).toBeLessThan(1e-10);
      const want = g(x, y, z);
      for (let c = 0; c < 3; c++) expect(Math.abs(out[1 + c] - want[c])).toBeLessThan(1e-9);
    }
  });

  it('mirror planes and the axial axis: the stored half answers for the other half (even symmetry)', () => {
    // φ = x² − y² + 3 is even in x and y; stored for x, y ≥ 0 only (mirror x, y).
    const grid: SolvedGrid = { symmetry: 'planar', origin: [0, 0, 0], spacing: 0.1, shape: [12, 12, 1], mirror: ['x', 'y'] };
    const it = new GridInterpolant(grid, sample(grid, (x, y) => x * x - y * y + 3));
    expect(it.evaluate(-0.43, -0.71, 0, out)).toBe(true);
    expect(out[0]).toBeCloseTo(0.43 ** 2 - 0.71 ** 2 + 3, 11);
    expect(out[1]).toBeCloseTo(-0.86, 9);
    expect(out[2]).toBeCloseTo(1.42, 9);
    // Axial: φ = r² − 2z² (the ideal trap, even in r) on (r, z); E_x = −2x, E_z = 4z.
    const ax: SolvedGrid = { symmetry: 'axial', origin: [0, 0, 0], spacing: 0.1, shape: [10, 20, 1], mirror: [] };
    const ia = new GridInterpolant(ax, sample(ax, (r, z) => r * r - 2 * (z - 1) ** 2));
    expect(ia.evaluate(0.3, -0.4, 1.3, out)).toBe(true);
    expect(out[0]).toBeCloseTo(0.25 - 2 * 0.09, 11);
    expect(out[1]).toBeCloseTo(0.6, 9);
    expect(out[2]).toBeCloseTo(-0.8, 9);
    expect(out[3]).toBeCloseTo(-4 * 0.3, 9);
    expect(ia.evaluate(0, 0, 1.3, out)).toBe(true);
    expect(out[1]).toBe(0);
  });

  it('gradient: continuous across cell faces and equal to the central difference of the value', () => {
    // A non-polynomial field, so the interpolant is not exact and continuity is not automatic.
    const grid: SolvedGrid = { symmetry: 'none', origin: [0, 0, 0], spacing: 0.2, shape: [10, 10, 10], mirror: [] };
    const it = new GridInterpolant(grid, sample(grid, (x, y, z) => Math.sin(2 * x) * Math.cos(y) * Math.exp(-0.3 * z)));
    const a = new Float64Array(4), b = new Float64Array(4);
    const eps = 1e-9;
    for (const face of [0.4, 0.8, 1.2]) {
      // Across x = face: the two sides' gradients agree to O(eps · second derivative).
      it.evaluate(face - eps, 0.77, 1.13, a);
      it.evaluate(face + eps, 0.77, 1.13, b);
      for (let c = 0; c < 4; c++) expect(Math.abs(a[c] - b[c])).toBeLessThan(1e-7);
    }
    // d/dx of the interpolated value by a central difference with step δ: error O(δ²·φ''') ≈ 1e-10.
    const d = 1e-5;
    const rnd = lcg(3);
    for (let n = 0; n < 50; n++) {
      const p = [0.1 + 1.6 * rnd(), 0.1 + 1.6 * rnd(), 0.1 + 1.6 * rnd()];
      it.evaluate(p[0], p[1], p[2], a);
      const g = [a[1], a[2], a[3]];
      for (let c = 0; c < 3; c++) {
        const q1 = [...p], q2 = [...p];
        q1[c] += d; q2[c] -= d;
        it.evaluate(q1[0], q1[1], q1[2], a);
        const up = a[0];
        it.evaluate(q2[0], q2[1], q2[2], a);
        expect(Math.abs((up - a[0]) / (2 * d) - g[c])).toBeLessThan(1e-6);
      }
    }
  });
});

describe('interleaved fields and the continuation into electrodes', () => {
  it('interleaved fields on one grid give each field exactly as its own interpolant does', () => {
    const grid: SolvedGrid = { symmetry: 'axial', origin: [0, 0, 0], spacing: 0.1, shape: [12, 20, 1], mirror: [] };
    const fa = sample(grid, (r, z) => r * r - 2 * z * z), fb = sample(grid, (r, z) => Math.cos(r) * Math.exp(-z));
    const both = new Float64Array(2 * fa.length);
    for (let n = 0; n < fa.length; n++) { both[2 * n] = fa[n]; both[2 * n + 1] = fb[n]; }
    const ia = new GridInterpolant(grid, fa), ib = new GridInterpolant(grid, fb), i2 = new GridInterpolant(grid, both, 2);
    const a = new Float64Array(4), b = new Float64Array(4), ab = new Float64Array(8);
    const rnd = lcg(5);
    for (let n = 0; n < 100; n++) {
      const x = 0.7 * rnd() - 0.35, y = 0.7 * rnd() - 0.35, z = 1.9 * rnd();
      ia.evaluate(x, y, z, a); ib.evaluate(x, y, z, b); expect(i2.evaluate(x, y, z, ab)).toBe(true);
      // Same weights, same sums in the same order: equal to round-off.
      for (let c = 0; c < 4; c++) { expect(Math.abs(ab[c] - a[c])).toBeLessThan(1e-13); expect(Math.abs(ab[4 + c] - b[c])).toBeLessThan(1e-13); }
    }
  });

  it('inside nodes within two cells of a surface take the continuation: exact for a quadratic', () => {
    // Quadratic extrapolation 3φ₁ − 3φ₂ + φ₃ is exact for polynomials of degree ≤ 2 along a grid
    // line (Newton forward differences, Abramowitz & Stegun 25.2.5): a disc of "electrode" nodes
    // holding a flat 1 V gets back the quadratic on its two outer layers, and only there.
    const grid: SolvedGrid = { symmetry: 'planar', origin: [-1, -1, 0], spacing: 0.1, shape: [21, 21, 1], mirror: [] };
    const f = (x: number, y: number) => 0.2 + x - 0.5 * y + x * x - 0.3 * x * y + 0.7 * y * y;
    const v = sample(grid, f);
    const inside = new Int16Array(v.length).fill(-1);
    const R = 0.55;
    for (let j = 0; j < 21; j++) for (let i = 0; i < 21; i++) {
      const x = -1 + 0.1 * i, y = -1 + 0.1 * j;
      if (x * x + y * y <= R * R) { inside[i + 21 * j] = 0; v[i + 21 * j] = 1; }
    }
    const w = extendIntoElectrodes(grid, v, inside);
    let filled = 0, kept = 0;
    for (let j = 0; j < 21; j++) for (let i = 0; i < 21; i++) {
      const n = i + 21 * j, x = -1 + 0.1 * i, y = -1 + 0.1 * j;
      if (inside[n] < 0) { expect(w[n]).toBe(v[n]); continue; }
      // Chebyshev distance to the nearest free node.
      let d = 99;
      for (let q = 0; q < 21; q++) for (let p = 0; p < 21; p++) if (inside[p + 21 * q] < 0) d = Math.min(d, Math.max(Math.abs(p - i), Math.abs(q - j)));
      if (w[n] !== 1) { filled++; expect(Math.abs(w[n] - f(x, y))).toBeLessThan(1e-12); expect(d).toBeLessThanOrEqual(2); }
      else { kept++; expect(d).toBeGreaterThan(1); }
    }
    expect(filled).toBeGreaterThan(20);
    expect(kept).toBeGreaterThan(0);
  });
});
