// Coulomb explosion of a uniformly charged sphere at rest. Each shell keeps its enclosed charge
// and the expansion is self-similar: r(t) = r0 f(t) with (df/dt)² = (2/τ²)(1 − 1/f),
// τ² = m R0³ / (k Q q) (Reiser, Theory and Design of Charged Particle Beams, Wiley 1994/2008, the
// uniform-sphere expansion; the closed form below integrates it). Integrating once more:
//   t(f) = (τ/√2) [ √(f(f − 1)) + ln(√f + √(f − 1)) ].
import { describe, it, expect } from 'vitest';
import { ELEMENTARY_CHARGE, ionMassKg } from '../../sim/units/constants.js';
import { COULOMB_K } from '../../sim/spacecharge/direct.js';
import { runEnsemble, type SpaceChargeSettings } from '../../sim/spacecharge/ensemble-step.js';
import { latticeSphere, uniformSphere } from './clouds.js';

const tOfF = (f: number, tau: number) => (tau / Math.SQRT2) * (Math.sqrt(f * (f - 1)) + Math.log(Math.sqrt(f) + Math.sqrt(f - 1)));

/** Invert t(f) by bisection (t is increasing in f). */
function fOfT(t: number, tau: number): number {
  let lo = 1, hi = 2;
  while (tOfF(hi, tau) < t) hi *= 2;
  for (let k = 0; k < 200; k++) { const mid = 0.5 * (lo + hi); if (tOfF(mid, tau) < t) lo = mid; else hi = mid; }
  return 0.5 * (lo + hi);
}

describe('Coulomb explosion of a uniform sphere (Reiser)', () => {
  const N = 2000, R0 = 50e-6, m = ionMassKg(100, 1), q = ELEMENTARY_CHARGE;
  const tau = Math.sqrt((m * R0 ** 3) / (COULOMB_K * N * q * q));

  for (const method of ['direct', 'tree'] as const) {
    it(`RMS and outer radius follow R0·f(t) within 2% (${method}, N = ${N})`, () => {
      const e = uniformSphere(N, R0, m, q, 7);
      const r0 = new Float64Array(N);
      for (let i = 0; i < N; i++) r0[i] = Math.hypot(e.x[i], e.y[i], e.z[i]);
      const sc: SpaceChargeSettings = { method, weight: 1 }; // default softening 1e-3 × spacing
      const tEnd = 2 * tau; // f ≈ 2.3: a modest expansion
      // Tolerance 2% (issue 7). A random sample of point charges lags the fluid solution by a
      // finite-N amount that does not depend on the step (measured here: outer shell −2.3% at
      // N = 500, −1.0% at 2000, −0.65% at 4000; h = τ/100 and τ/400 agree to 1e-6), so N = 2000
      // leaves a factor 2 of margin.
      const h = runEnsemble(e, { tEnd, h: tau / 100, external: { kind: 'none' }, spaceCharge: sc, recordEvery: 50 });
      // RMS radius: self-similar, so it scales by the same f(t) (centroid stays at the centre).
      for (let k = 1; k < h.t.length; k++) {
        const f = fOfT(h.t[k], tau);
        expect(Math.abs(h.sr[k] / h.sr[0] / f - 1)).toBeLessThan(0.02);
      }
      // Outer shell: ions starting beyond 0.9 R0 (enclosed charge ≈ N (r0/R0)³ as for the sphere).
      const fEnd = fOfT(tEnd, tau);
      let s = 0, c = 0;
      for (let i = 0; i < N; i++) if (r0[i] > 0.9 * R0) { s += Math.hypot(e.x[i], e.y[i], e.z[i]) / r0[i]; c++; }
      expect(c).toBeGreaterThan(100);
      expect(fEnd).toBeGreaterThan(2);
      expect(Math.abs(s / c / fEnd - 1)).toBeLessThan(0.02);
    }, 60_000);
  }

  it('each ion gains q Q(<r0)/(4π ε0)(1/r0 − 1/r) within 10 % (lattice sphere, direct)', () => {
    // A random cloud spreads the per-ion energies by its microfield, the field of the nearest
    // neighbours (Holtsmark; S. Chandrasekhar, Rev. Mod. Phys. 15, 1 (1943), ch. IV, from memory),
    // relative to the mean field ~ N^(−1/3): measured RMS of the ratio 0.128 at N = 2000 and 0.080
    // at N = 8000 for 0.7 R0 < r0 < 0.9 R0. A lattice has none, so each ion's own energy can be
    // checked. Q(<r0): the ions at smaller radius plus half of those on its own shell (the field of
    // a thin shell at the shell is half its charge's, Gauss's law).
    const L = 7.8;
    const e = latticeSphere(L, R0, m, q);
    const n = e.n, a = R0 / L;
    const Reff = a * Math.cbrt((3 * n) / (4 * Math.PI)); // the uniform sphere of the same density
    const tauL = Math.sqrt((m * Reff ** 3) / (COULOMB_K * n * q * q));
    const r0 = Float64Array.from({ length: n }, (_, i) => Math.hypot(e.x[i], e.y[i], e.z[i]));
    const inside = Float64Array.from({ length: n }, (_, i) => {
      let c = 0;
      for (let j = 0; j < n; j++) {
        if (j === i) continue;
        const d = r0[j] - r0[i];
        c += d < -1e-9 * a ? 1 : Math.abs(d) <= 1e-9 * a ? 0.5 : 0;
      }
      return c;
    });
    runEnsemble(e, { tEnd: 3 * tauL, h: tauL / 100, external: { kind: 'none' }, spaceCharge: { method: 'direct', weight: 1 }, recordEvery: 1000 });
    const ratios: number[] = [];
    for (let i = 0; i < n; i++) {
      if (r0[i] < 0.5 * R0) continue; // fewer than 1/8 of the ions inside: a lattice ball is not round there
      const r = Math.hypot(e.x[i], e.y[i], e.z[i]);
      const want = COULOMB_K * q * inside[i] * q * (1 / r0[i] - 1 / r);
      ratios.push((0.5 * m * (e.vx[i] ** 2 + e.vy[i] ** 2 + e.vz[i] ** 2)) / want);
    }
    ratios.sort((u, v) => u - v);
    expect(ratios.length).toBeGreaterThan(1500);
    // Tolerance: measured extremes 0.920 and 1.074 (N = 1935), the same at h = τ/300 (not the
    // step), narrowing with N (0.937 and 1.063 at N = 4169): the jagged surface of the lattice
    // ball inside each ion, not the dynamics. 10 % leaves a margin; the median holds to 1 %.
    expect(ratios[0]).toBeGreaterThan(0.9);
    expect(ratios[ratios.length - 1]).toBeLessThan(1.1);
    expect(Math.abs(ratios[ratios.length >> 1] - 1)).toBeLessThan(0.01);
  }, 60_000);
});
