// The one-period transfer matrices of the ideal quadrupole (sim/fastpath/transfer-matrix.ts)
// against an outside reference: the Mathieu equation integrated with odex 2.0.4 (Hairer & Wanner's
// extrapolation code, rtol = atol = 1e-13), and the textbook properties of Hill's equation.

import { describe, expect, it } from 'vitest';
import { fAt, mat2, periodTable, powerApply, rowAt, spectralRows, twissRows } from '../../sim/fastpath/transfer-matrix.js';
import { odexIntegrate } from '../../sim/integrate/odex-reference.js';

/** F(θ) by odex: U'' = −(a/4 + (q/2) cos θ) U from 0 to θ, both fundamental solutions. */
function odexF(a: number, q: number, theta: number): number[] {
  const f = (t: number, y: Float64Array, d: Float64Array) => {
    const w = a / 4 + (q / 2) * Math.cos(t);
    d[0] = y[1]; d[1] = -w * y[0]; d[2] = y[3]; d[3] = -w * y[2];
  };
  if (theta === 0) return [1, 0, 0, 1];
  const y = odexIntegrate(f, 0, [1, 0, 0, 1], theta, { rtol: 1e-13, atol: 1e-13 }).y;
  return [y[0], y[2], y[1], y[3]]; // [[u1, u2], [u1', u2']]
}

// Operating points: Skerry QF-4 peak scan (m/z 502 near the apex, x and y), a = 0 (RF only), and
// one outside the first region (unstable in x).
const POINTS: [string, number, number][] = [
  ['near the apex, x', 0.2350, 0.7046],
  ['near the apex, y', -0.2350, -0.7046],
  ['RF only, q = 0.5', 0, 0.5],
  ['unstable, q = 0.95', 0, 0.95],
];

describe('one-period transfer matrix vs odex 2.0.4', () => {
  for (const [label, a, q] of POINTS) {
    it(`monodromy and F(θ) agree with odex (${label})`, () => {
      const t = periodTable(a, q, 40);
      const ref = odexF(a, q, 2 * Math.PI);
      // Table error: RK4 with step 2π/640, measured ≤ 2e-10 on M0 at eight points of the first
      // region (transfer-matrix.ts); 1e-9 leaves a factor 5.
      expect(Math.abs(t.m11 - ref[0])).toBeLessThan(1e-9);
      expect(Math.abs(t.m12 - ref[1])).toBeLessThan(1e-9);
      expect(Math.abs(t.m21 - ref[2])).toBeLessThan(1e-9);
      expect(Math.abs(t.m22 - ref[3])).toBeLessThan(1e-9);
      // Liouville: det M0 = 1 (Magnus & Winkler, Hill's Equation, 1966, §1.2).
      expect(Math.abs(t.m11 * t.m22 - t.m12 * t.m21 - 1)).toBeLessThan(1e-10);
      // Stability iff |tr M0| < 2 (same reference); q = 0.95 at a = 0 lies past the 0.908 edge.
      expect(t.stable).toBe(Math.abs(ref[0] + ref[3]) < 2);
      // Arbitrary phases: grid point plus one short RK4 step.
      const F = mat2();
      const row = new Float64Array(2);
      for (const theta of [0.1234, 1.5, 2.9, 4.4, 6.2]) {
        fAt(t, theta, F);
        const r = odexF(a, q, theta);
        expect(Math.abs(F.a11 - r[0])).toBeLessThan(1e-9);
        expect(Math.abs(F.a12 - r[1])).toBeLessThan(1e-9);
        expect(Math.abs(F.a21 - r[2])).toBeLessThan(1e-9);
        expect(Math.abs(F.a22 - r[3])).toBeLessThan(1e-9);
        // Third-order Taylor row: remainder ε⁴/24·|U''''| ≲ 2e-9·|F| (transfer-matrix.ts).
        const i = Math.floor(theta / t.dTheta);
        rowAt(t, i, theta - i * t.dTheta, row);
        expect(Math.abs(row[0] - r[0])).toBeLessThan(1e-8);
        expect(Math.abs(row[1] - r[1])).toBeLessThan(1e-8);
      }
    });
  }

  it('Courant–Snyder form is invariant under M0 (Courant & Snyder 1958, eq. 3.13)', () => {
    const t = periodTable(0.2350, 0.7046, 40);
    expect(t.stable).toBe(true);
    expect(t.beta * t.gamma - t.alpha * t.alpha).toBeCloseTo(1, 9);
    // I(M0·d) = I(d) for a few states d.
    const inv = (d1: number, d2: number) => t.gamma * d1 * d1 + 2 * t.alpha * d1 * d2 + t.beta * d2 * d2;
    for (const [d1, d2] of [[1, 0], [0, 1], [0.3, -0.7]]) {
      const e1 = t.m11 * d1 + t.m12 * d2, e2 = t.m21 * d1 + t.m22 * d2;
      expect(Math.abs(inv(e1, e2) - inv(d1, d2)) / inv(d1, d2)).toBeLessThan(1e-10);
    }
  });

  it('matrix power by repeated squaring equals k one-period products', () => {
    for (const [, a, q] of POINTS) {
      const t = periodTable(a, q, 40);
      const out = new Float64Array(2);
      let d1 = 0.2, d2 = -0.1;
      for (let k = 1; k <= 37; k++) {
        const e = t.m11 * d1 + t.m12 * d2; d2 = t.m21 * d1 + t.m22 * d2; d1 = e;
        powerApply(t, k, 0.2, -0.1, out);
        const scale = Math.max(1, Math.hypot(d1, d2));
        expect(Math.abs(out[0] - d1) / scale).toBeLessThan(1e-12);
        expect(Math.abs(out[1] - d2) / scale).toBeLessThan(1e-12);
      }
    }
  });

  it('the unstable eigen-bound holds: |U(θ)| ≤ |A|h1|λ|^k + |B|h2|λ|^-k over 20 periods', () => {
    const t = periodTable(0, 0.95, 40);
    const c1 = 0.01, c2 = 0.02;
    const A = Math.abs(t.vi11 * c1 + t.vi12 * c2), B = Math.abs(t.vi21 * c1 + t.vi22 * c2);
    const F = mat2(), d = new Float64Array(2);
    for (let k = 0; k < 20; k++) {
      powerApply(t, k, c1, c2, d);
      const bound = A * t.h1 * Math.abs(t.lambda) ** k + B * t.h2 * Math.abs(t.lambda) ** -k;
      for (let j = 0; j < 64; j++) {
        fAt(t, (2 * Math.PI * j) / 64, F);
        // Grid bound plus 1e-3 (the margin the path uses between grid points).
        expect(Math.abs(F.a11 * d[0] + F.a12 * d[1])).toBeLessThanOrEqual(bound * (1 + 1e-3));
      }
    }
  });

  it('spectral rows: λ^K·(p1·w) + λ^−K·(p2·w) equals the sample row(ψ)·M0^K·F(ψ)⁻¹·w within the stated bound', () => {
    // Magnus & Winkler 1966 §1.2 (hyperbolic monodromy: M = λΠ1 + λ⁻¹Π2); the reference is the
    // table's own F(ψ) (one RK4 step from the grid, checked against odex above) and M0^K by
    // repeated squaring. Both edges of the first region and a point far outside.
    for (const [a, q] of [[0.2350, 0.7100], [-0.2350, -0.7000], [0, 0.95], [0.1, 1.2]] as const) {
      for (const [aa, qq] of [[a, q], [-a, -q]] as const) {
        const t = periodTable(aa, qq, 40);
        if (t.stable) continue;
        const sp = spectralRows(t, 60);
        expect(sp.err1).toBeGreaterThan(0);
        const F = mat2(), d = new Float64Array(2);
        let worstRatio = 0, worstRel = 0;
        for (let j = 0; j < 97; j++) {
          const psi = (2 * Math.PI * (j + 0.37)) / 97;
          const w1 = Math.cos(3 * j), w2 = Math.sin(5 * j);
          fAt(t, psi, F);
          const det = F.a11 * F.a22 - F.a12 * F.a21;
          const c1 = (F.a22 * w1 - F.a12 * w2) / det, c2 = (-F.a21 * w1 + F.a11 * w2) / det;
          for (const K of [1, 7, 25]) {
            if (K >= sp.count) continue;
            powerApply(t, K, c1, c2, d);
            const ref = F.a11 * d[0] + F.a12 * d[1];
            const i0 = Math.min(t.n - 1, Math.floor(psi / t.dTheta)), wt = (psi - i0 * t.dTheta) / t.dTheta;
            const lin = (g: Float64Array) => (1 - wt) * g[i0] + wt * g[i0 + 1];
            const L = sp.lamPow[K];
            const U = L * (lin(sp.a1) * w1 + lin(sp.b1) * w2) + (lin(sp.a2) * w1 + lin(sp.b2) * w2) / L;
            const bound = (Math.abs(L) * sp.err1 + sp.err2 / Math.abs(L)) * (Math.abs(w1) + Math.abs(w2));
            worstRatio = Math.max(worstRatio, Math.abs(U - ref) / bound);
            // Relative to the sample's scale (a sample itself may pass through zero).
            worstRel = Math.max(worstRel, Math.abs(U - ref) / ((Math.abs(L) + 1 / Math.abs(L)) * (Math.abs(w1) + Math.abs(w2))));
          }
        }
        // The bound holds (ratio < 1) and is not loose by orders of magnitude; the values agree
        // to the interpolation error, about 1e-5 relative on a 640-point grid.
        expect(worstRatio).toBeLessThan(1);
        expect(worstRatio).toBeGreaterThan(1e-3);
        expect(worstRel).toBeLessThan(1e-3);
      }
    }
  });

  it('Courant–Snyder rows: the interpolated form at ψ bounds the invariant of F(ψ)⁻¹·w from above, within 1e-4 of its scale', () => {
    // Courant & Snyder 1958 (I = γU² + 2αUU' + βU'² at phase 0); reference: c = F(ψ)⁻¹·w with the
    // table's F(ψ) (checked against odex above). The apex point (x and y), two nearer the edges
    // (μ ≈ 0.09 in x, 0.05 in y) and RF only, q = 0.5.
    for (const [a, q] of [[0.2350, 0.7046], [-0.2350, -0.7046], [0.2355, 0.7060], [-0.2330, -0.7000], [0, 0.5]] as const) {
      const t = periodTable(a, q, 40);
      expect(t.stable).toBe(true);
      const tw = twissRows(t);
      const qMax = (g: Float64Array) => g.reduce((m, v) => Math.max(m, Math.abs(v)), 0);
      const F = mat2();
      let worst = 0;
      for (let j = 0; j < 97; j++) {
        const psi = (2 * Math.PI * (j + 0.61)) / 97;
        const w1 = Math.cos(7 * j), w2 = Math.sin(11 * j);
        fAt(t, psi, F);
        const det = F.a11 * F.a22 - F.a12 * F.a21;
        const c1 = (F.a22 * w1 - F.a12 * w2) / det, c2 = (-F.a21 * w1 + F.a11 * w2) / det;
        const I = t.gamma * c1 * c1 + 2 * t.alpha * c1 * c2 + t.beta * c2 * c2;
        const i0 = Math.min(t.n - 1, Math.floor(psi / t.dTheta)), wt = (psi - i0 * t.dTheta) / t.dTheta;
        const lin = (g: Float64Array) => (1 - wt) * g[i0] + wt * g[i0 + 1];
        const Iint = lin(tw.q11) * w1 * w1 + 2 * lin(tw.q12) * w1 * w2 + lin(tw.q22) * w2 * w2;
        const up = Iint + tw.e11 * w1 * w1 + 2 * tw.e12 * Math.abs(w1 * w2) + tw.e22 * w2 * w2;
        expect(up).toBeGreaterThanOrEqual(I);
        // Looseness on the scale of the form over the period (the bound is one number per table,
        // so where the form is small at ψ it is loose in relative terms, never below I).
        const scale = qMax(tw.q11) * w1 * w1 + 2 * qMax(tw.q12) * Math.abs(w1 * w2) + qMax(tw.q22) * w2 * w2;
        worst = Math.max(worst, (up - I) / scale);
      }
      expect(worst).toBeLessThan(1e-4);
    }
  });
});
