// Coulomb explosion of a uniformly charged sphere at rest. Each shell keeps its enclosed charge
// and the expansion is self-similar: r(t) = r0 f(t) with (df/dt)² = (2/τ²)(1 − 1/f),
// τ² = m R0³ / (k Q q) (Reiser, Theory and Design of Charged Particle Beams, Wiley 1994/2008, the
// uniform-sphere expansion; the closed form below integrates it). Integrating once more:
//   t(f) = (τ/√2) [ √(f(f − 1)) + ln(√f + √(f − 1)) ].
import { describe, it, expect } from 'vitest';
import { ELEMENTARY_CHARGE, ionMassKg } from '../../sim/units/constants.js';
import { COULOMB_K } from '../../sim/spacecharge/direct.js';
import { runEnsemble, type SpaceChargeSettings } from '../../sim/spacecharge/ensemble-step.js';
import { uniformSphere } from './clouds.js';

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
});
