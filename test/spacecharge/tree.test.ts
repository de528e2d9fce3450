// Barnes–Hut tree (Barnes & Hut, Nature 324, 446, 1986) against the direct Coulomb sum.
import { describe, it, expect } from 'vitest';
import { ELEMENTARY_CHARGE, ionMassKg } from '../../sim/units/constants.js';
import { directField, fieldTile, scaleField, COULOMB_K, type ChargeCloud, type FieldOut } from '../../sim/spacecharge/direct.js';
import { CoulombTree } from '../../sim/spacecharge/tree.js';
import { uniformSphere, gaussianCloud } from './clouds.js';
import type { Ensemble } from '../../sim/spacecharge/ensemble-step.js';

const field = (n: number): FieldOut => ({ ex: new Float64Array(n), ey: new Float64Array(n), ez: new Float64Array(n) });
const cloudOf = (e: Ensemble): ChargeCloud => ({ n: e.n, x: e.x, y: e.y, z: e.z, qs: e.charge });

/** RMS relative force error sqrt(Σ|ΔE|² / Σ|E|²), the measure used by Barnes & Hut. */
function rmsError(a: FieldOut, b: FieldOut, n: number): number {
  let num = 0, den = 0;
  for (let i = 0; i < n; i++) {
    num += (a.ex[i] - b.ex[i]) ** 2 + (a.ey[i] - b.ey[i]) ** 2 + (a.ez[i] - b.ez[i]) ** 2;
    den += b.ex[i] ** 2 + b.ey[i] ** 2 + b.ez[i] ** 2;
  }
  return Math.sqrt(num / den);
}

const m = ionMassKg(100, 1), q = ELEMENTARY_CHARGE;
const clouds: [string, Ensemble][] = [
  ['uniform sphere', uniformSphere(2000, 50e-6, m, q, 11)],
  ['Gaussian, prolate', gaussianCloud(2000, 100e-6, 300e-6, m, q, 12)],
];

describe('tree vs direct Coulomb field', () => {
  for (const [name, e] of clouds) {
    it(`RMS force error below 1% at θ = 0.5 (${name}, N = 2000)`, () => {
      const c = cloudOf(e), eps = 1e-9;
      const ref = field(e.n), got = field(e.n), mono = field(e.n);
      directField(c, eps, ref);
      new CoulombTree({ theta: 0.5 }).field(c, eps, got);
      new CoulombTree({ theta: 0.5, quadrupole: false }).field(c, eps, mono);
      const errQ = rmsError(got, ref, e.n), errM = rmsError(mono, ref, e.n);
      // Issue 7 bound: 1% RMS at θ = 0.5. Quadrupoles must not make it worse than the monopole tree.
      expect(errQ).toBeLessThan(0.01);
      expect(errM).toBeLessThan(0.01);
      expect(errQ).toBeLessThan(errM);
    });
  }

  it('θ = 0 opens every cell and reproduces the direct sum to rounding', () => {
    const e = clouds[1][1], c = cloudOf(e);
    const ref = field(e.n), got = field(e.n);
    directField(c, 1e-9, ref);
    new CoulombTree({ theta: 0 }).field(c, 1e-9, got);
    // Same pair terms summed in another order: ~N·1e-16 relative at worst.
    expect(rmsError(got, ref, e.n)).toBeLessThan(1e-12);
  });

  it('the tree error shrinks as θ falls (multipole truncation error ~ θ^{p+1})', () => {
    const e = clouds[0][1], c = cloudOf(e);
    const ref = field(e.n), got = field(e.n);
    directField(c, 1e-9, ref);
    const errs = [0.8, 0.5, 0.3].map((theta) => { new CoulombTree({ theta }).field(c, 1e-9, got); return rmsError(got, ref, e.n); });
    expect(errs[1]).toBeLessThan(errs[0]);
    expect(errs[2]).toBeLessThan(errs[1]);
  });

  it('the error falls by more than 5× when θ halves: third-order truncation of multipoles and local expansion', () => {
    // Quadrupole moments and a local expansion to second derivatives leave remainders of third
    // order in θ (Taylor's theorem), so halving θ should cut the error by about 2³ = 8 (measured
    // 20× on this sphere, 2.6e-4 → 1.3e-5). A slip in the local expansion's gradient or second
    // derivatives would leave a first- or second-order error, falling only 2–4×.
    const e = clouds[0][1], c = cloudOf(e);
    const ref = field(e.n), got = field(e.n);
    directField(c, 1e-9, ref);
    const [e5, e25] = [0.5, 0.25].map((theta) => { new CoulombTree({ theta }).field(c, 1e-9, got); return rmsError(got, ref, e.n); });
    expect(e25).toBeLessThan(e5 / 5);
  });
});

describe('tree edge cases', () => {
  it('handles one ion, coincident ions (depth cap) and removed ions like the direct sum', () => {
    const one: ChargeCloud = { n: 1, x: new Float64Array(1), y: new Float64Array(1), z: new Float64Array(1), qs: new Float64Array([q]) };
    const o1 = field(1);
    new CoulombTree().field(one, 1e-9, o1);
    expect(o1.ex[0]).toBe(0);
    // 30 ions on one point among 300 others, 10 others with zero source charge (removed).
    const e = gaussianCloud(330, 50e-6, 50e-6, m, q, 41), c = { ...cloudOf(e), qs: new Float64Array(e.charge) };
    for (let i = 0; i < 30; i++) { e.x[i] = 1e-5; e.y[i] = 2e-5; e.z[i] = -1e-5; }
    for (let i = 300; i < 310; i++) c.qs[i] = 0;
    const ref = field(e.n), got = field(e.n);
    directField(c, 1e-7, ref);
    new CoulombTree({ theta: 0.5 }).field(c, 1e-7, got);
    expect(rmsError(got, ref, e.n)).toBeLessThan(0.01);
  });
});

describe('direct sum', () => {
  const e = clouds[1][1], c = cloudOf(e);
  it('gives the same bits when cut into tiles run in wavefront order (worker-count independence)', () => {
    const whole = field(e.n), parts = field(e.n);
    directField(c, 1e-9, whole);
    const B = 173, nb = Math.ceil(e.n / B); // a tile size that does not divide N
    for (let d = 0; d <= 2 * (nb - 1); d++) {
      // Within an anti-diagonal the tiles touch disjoint blocks; run them in reverse to show order there is free.
      for (let I = Math.floor(d / 2); I >= Math.max(0, d - nb + 1); I--) {
        const J = d - I;
        fieldTile(c, 1e-18, I * B, Math.min(e.n, (I + 1) * B), J * B, Math.min(e.n, (J + 1) * B), parts);
      }
    }
    scaleField(parts, e.n, COULOMB_K);
    for (let i = 0; i < e.n; i++) {
      expect(parts.ex[i]).toBe(whole.ex[i]); expect(parts.ey[i]).toBe(whole.ey[i]); expect(parts.ez[i]).toBe(whole.ez[i]);
    }
  });

  it('sums to zero net force (Newton\'s third law) and matches a single pair by hand', () => {
    const out = field(e.n);
    directField(c, 0, out);
    let fx = 0, fabs = 0;
    for (let i = 0; i < e.n; i++) { fx += c.qs[i] * out.ex[i]; fabs += Math.abs(c.qs[i] * out.ex[i]); }
    expect(Math.abs(fx) / fabs).toBeLessThan(1e-12);
    // Two charges at 1 µm: E = k q / r² (Coulomb's law), k from CODATA 2018 ε0.
    const two: ChargeCloud = { n: 2, x: new Float64Array([0, 1e-6]), y: new Float64Array(2), z: new Float64Array(2), qs: new Float64Array([q, q]) };
    const o2 = field(2);
    directField(two, 0, o2);
    const expected = (q / (4 * Math.PI * 8.8541878128e-12)) / 1e-12;
    expect(Math.abs(-o2.ex[0] - expected) / expected).toBeLessThan(1e-14);
    expect(o2.ex[1]).toBe(-o2.ex[0]);
  });
});
