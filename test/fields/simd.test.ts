// The SIMD form of the tricubic gradient (sim/fields/simd/pair3.wat, run through WebAssembly):
// - its committed binary is what wabt 1.0.39 (the WebAssembly Binary Toolkit) assembles from the
//   .wat beside it, so the readable source and the bytes that run cannot drift apart;
// - it gives the bits of the scalar form on the same grid and points (same order of additions),
//   on 3D grids (tricubic) and on planar and axial grids (bicubic);
// - the gradient of the superposition φ_dc + cr·φ_rf of two tricubic polynomials is exact
//   (cubic Hermite with fourth-order node derivatives reproduces degree ≤ 3: Fornberg, Math.
//   Comp. 51 (1988), table 1), with mirror planes folded.

import { describe, expect, it } from 'vitest';
import { GridInterpolant } from '../../sim/fields/interpolate.js';
import type { SolvedGrid } from '../../sim/fields/problem.js';
import { PAIR3_WASM } from '../../sim/fields/simd/pair3-binary.js';
import { assemblePair3 } from '../tools/assemble-wasm.js';

const dc = (x: number, y: number, z: number) => x * y * z + z * z * z - x * x * z + 0.5 * y * y + 2;
const dcGrad = (x: number, y: number, z: number) => [y * z - 2 * x * z, x * z + y, x * y + 3 * z * z - x * x];
const rf = (x: number, y: number, z: number) => x * x * x - 3 * x * y * y + 0.25 * z * z * y - 1;
const rfGrad = (x: number, y: number, z: number) => [3 * x * x - 3 * y * y, -6 * x * y + 0.25 * z * z, 0.5 * z * y];

function pair(grid: SolvedGrid): Float64Array {
  const [n0, n1, n2] = grid.shape, h = grid.spacing;
  const v = new Float64Array(2 * n0 * n1 * n2);
  for (let k = 0; k < n2; k++) for (let j = 0; j < n1; j++) for (let i = 0; i < n0; i++) {
    const x = grid.origin[0] + i * h, y = grid.origin[1] + j * h, z = grid.origin[2] + k * h;
    const n = i + n0 * (j + n1 * k);
    v[2 * n] = dc(x, y, z); v[2 * n + 1] = rf(x, y, z);
  }
  return v;
}

function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => { s = (1664525 * s + 1013904223) >>> 0; return s / 2 ** 32; };
}

describe('SIMD tricubic gradient', () => {
  it('the committed binary is the assembled pair3.wat', async () => {
    expect(await assemblePair3()).toBe(PAIR3_WASM);
  });

  it('same bits as the scalar form, and exact for a pair of tricubic polynomials', () => {
    const grid: SolvedGrid = { symmetry: 'none', origin: [0, 0, 0], spacing: 0.25, shape: [9, 8, 10], mirror: [] };
    const v = pair(grid);
    const fast = new GridInterpolant(grid, v, 2), plain = new GridInterpolant(grid, v, 2, false);
    const a = new Float64Array(3), b = new Float64Array(3);
    const rnd = lcg(7);
    let differ = 0;
    for (let n = 0; n < 400; n++) {
      const x = 2 * rnd(), y = 1.75 * rnd(), z = 2.25 * rnd(), cr = -3 + 6 * rnd();
      expect(fast.gradientOfPair(x, y, z, cr, a)).toBe(true);
      expect(plain.gradientOfPair(x, y, z, cr, b)).toBe(true);
      for (let c = 0; c < 3; c++) if (a[c] !== b[c]) differ++;
      const gd = dcGrad(x, y, z), gr = rfGrad(x, y, z);
      // Round-off only: values of order 10 through 216 weights of order 1 (cf. interpolate.test.ts).
      for (let c = 0; c < 3; c++) expect(Math.abs(a[c] - (gd[c] + cr * gr[c]))).toBeLessThan(1e-9);
    }
    expect(differ).toBe(0);
    expect(fast.gradientOfPair(2.5, 1, 1, 1, a)).toBe(false);
  });

  it('folds mirror planes as the scalar form does', () => {
    // Even in x and y about 0 (a stored quarter): φ = x² + y² z, ψ = x² y² − z³.
    const grid: SolvedGrid = { symmetry: 'none', origin: [0, 0, -1], spacing: 0.2, shape: [8, 8, 11], mirror: ['x', 'y'] };
    const [n0, n1, n2] = grid.shape;
    const v = new Float64Array(2 * n0 * n1 * n2);
    for (let k = 0; k < n2; k++) for (let j = 0; j < n1; j++) for (let i = 0; i < n0; i++) {
      const x = i * 0.2, y = j * 0.2, z = -1 + k * 0.2, n = i + n0 * (j + n1 * k);
      v[2 * n] = x * x + y * y * z; v[2 * n + 1] = x * x * y * y - z * z * z;
    }
    const fast = new GridInterpolant(grid, v, 2), plain = new GridInterpolant(grid, v, 2, false);
    const a = new Float64Array(3), b = new Float64Array(3);
    const rnd = lcg(3);
    for (let n = 0; n < 200; n++) {
      const x = -1.2 + 2.4 * rnd(), y = -1.2 + 2.4 * rnd(), z = -0.9 + 1.8 * rnd(), cr = 2 * rnd() - 1;
      expect(fast.gradientOfPair(x, y, z, cr, a)).toBe(true);
      plain.gradientOfPair(x, y, z, cr, b);
      expect([...a]).toEqual([...b]);
      const want = [2 * x + cr * 2 * x * y * y, 2 * y * z + cr * 2 * x * x * y, y * y - cr * 3 * z * z];
      for (let c = 0; c < 3; c++) expect(Math.abs(a[c] - want[c])).toBeLessThan(1e-9);
    }
  });

  it('bicubic form (planar and axial grids): the scalar bits, exact for cubics', () => {
    const planar: SolvedGrid = { symmetry: 'planar', origin: [-1, -0.5, 0], spacing: 0.1, shape: [21, 13, 1], mirror: [] };
    const axial: SolvedGrid = { symmetry: 'axial', origin: [0, -1, 0], spacing: 0.1, shape: [12, 21, 1], mirror: [] };
    // Planar: φ = x³ − 3xy² + y, ψ = x²y; axial (r, z), even in r (the axis is a symmetry end of
    // the interpolant): φ = r² + z³, ψ = r²z.
    const fill = (g: SolvedGrid, f: (a: number, b: number) => [number, number]) => {
      const [n0, n1] = g.shape, v = new Float64Array(2 * n0 * n1);
      for (let j = 0; j < n1; j++) for (let i = 0; i < n0; i++) {
        const [p, q] = f(g.origin[0] + i * g.spacing, g.origin[1] + j * g.spacing);
        v[2 * (i + n0 * j)] = p; v[2 * (i + n0 * j) + 1] = q;
      }
      return v;
    };
    const vp = fill(planar, (x, y) => [x ** 3 - 3 * x * y * y + y, x * x * y]);
    const va = fill(axial, (r, z) => [r * r + z ** 3, r * r * z]);
    const a = new Float64Array(3), b = new Float64Array(3);
    const rnd = lcg(11);
    for (const [grid, v] of [[planar, vp], [axial, va]] as const) {
      const fast = new GridInterpolant(grid, v, 2), plain = new GridInterpolant(grid, v, 2, false);
      for (let n = 0; n < 200; n++) {
        const cr = 4 * rnd() - 2;
        let x: number, y: number, z: number, want: number[];
        if (grid.symmetry === 'planar') {
          x = -1 + 2 * rnd(); y = -0.5 + 1.2 * rnd(); z = 0;
          want = [3 * x * x - 3 * y * y + cr * 2 * x * y, -6 * x * y + 1 + cr * x * x, 0];
        } else {
          // A point at radius r < 1.1 and azimuth θ; ∂/∂x = (x/r) ∂/∂r.
          const r = 1.05 * rnd(), th = 2 * Math.PI * rnd();
          x = r * Math.cos(th); y = r * Math.sin(th); z = -1 + 2 * rnd();
          const dr = 2 * r + cr * 2 * r * z, dz = 3 * z * z + cr * r * r;
          want = [dr * Math.cos(th), dr * Math.sin(th), dz];
        }
        expect(fast.gradientOfPair(x, y, z, cr, a)).toBe(true);
        plain.gradientOfPair(x, y, z, cr, b);
        expect([...a]).toEqual([...b]);
        for (let c = 0; c < 3; c++) expect(Math.abs(a[c] - want[c])).toBeLessThan(1e-9);
      }
    }
  });
});
