// Ions in an ideal 3D RF trap: single-ion secular frequency against the Mathieu exponent β,
// and its fall as the stored charge grows (fact of the trade, common practice, no source).
import { describe, it, expect } from 'vitest';
import { ELEMENTARY_CHARGE, ionMassKg } from '../../sim/units/constants.js';
import { runEnsemble, type SpaceChargeSettings } from '../../sim/spacecharge/ensemble-step.js';
import { SecularSpectrum } from '../../sim/spacecharge/spectrum.js';
import { gaussianCloud } from './clouds.js';

/**
 * β of the Mathieu equation u'' + (a − 2q cos 2ξ) u = 0 from the continued fraction
 *   β² = a + q²/((β+2)² − a − q²/((β+4)² − a − …)) + q²/((β−2)² − a − q²/((β−4)² − a − …))
 * (R. E. March & J. F. J. Todd, Quadrupole Ion Trap Mass Spectrometry, 2nd ed., Wiley 2005,
 * Ch. 2; quoted from memory), solved by fixed-point iteration; valid inside the first zone.
 */
function mathieuBeta(a: number, q: number): number {
  const frac = (beta: number, sign: number) => {
    let t = 0;
    for (let k = 12; k >= 1; k--) t = (q * q) / ((beta + sign * 2 * k) ** 2 - a - t);
    return t;
  };
  let beta = Math.sqrt(a + (q * q) / 2);
  for (let it = 0; it < 100; it++) beta = Math.sqrt(a + frac(beta, 1) + frac(beta, -1));
  return beta;
}

describe('RF trap: secular frequency with space charge', () => {
  // Ideal trap, DESIGN.md convention; invented operating point of the Skerry T-7 kind.
  const r0 = 1e-2, z0 = r0 / Math.SQRT2, fRF = 1e6, omega = 2 * Math.PI * fRF;
  const m = ionMassKg(100, 1), e = ELEMENTARY_CHARGE, qz = 0.3;
  const D = r0 * r0 + 2 * z0 * z0;
  const rfVolts = (qz * m * D * omega * omega) / (8 * e); // q_z = 8eV/(m (r0² + 2z0²) Ω²)
  const fz = (mathieuBeta(0, qz) * fRF) / 2; // ω_z = β_z Ω/2 (fundamental of the secular motion)
  const nSim = 150, T = 400 / fRF;

  function secularPeak(sc: SpaceChargeSettings | null): { f: number; alive: number } {
    const ens = gaussianCloud(nSim, 0.3e-3, 0.15e-3, m, e, 21);
    const spec = new SecularSpectrum(nSim, 0.5 * fz, 1.2 * fz, 161, 0, T, 'z');
    let step = 0;
    const h = runEnsemble(ens, {
      tEnd: T, h: 1 / (40 * fRF), spaceCharge: sc, recordEvery: 1000,
      external: { kind: 'rf-trap', r0, z0, dcVolts: 0, rfVolts, omega },
      onStep: (t, en) => { if (step++ % 4 === 0) spec.add(t, en); },
    });
    return { f: spec.peak(), alive: h.alive[h.alive.length - 1] };
  }

  it('without space charge the single-ion z line sits at β_z Ω/2 (Mathieu, a = 0, q_z = 0.3)', () => {
    const r = secularPeak(null);
    // 0.5%: grid spacing 0.44 kHz with parabolic refinement over a 0.4 ms Hann window, plus the
    // Störmer–Verlet phase error at 40 steps per RF period (~(Ωh)²/24 ≈ 1e-3).
    expect(Math.abs(r.f / fz - 1)).toBeLessThan(0.005);
    expect(r.alive).toBe(nSim);
  }, 60_000);

  it('falls as the number of stored charges grows (150 simulated ions, weight 1 → 10 → 30)', () => {
    const f0 = secularPeak(null).f;
    const f = [1, 10, 30].map((weight) => secularPeak({ method: 'direct', weight }));
    for (const r of f) expect(r.alive).toBe(nSim);
    // Strictly falling with the charge, and a clear shift (> 3%) at 4500 charges, where the cloud's
    // plasma frequency is comparable with ω_z (n ≈ 2e13 m⁻³, ω_p² ≈ ω_z²).
    expect(f[0].f).toBeLessThan(f0);
    expect(f[1].f).toBeLessThan(f[0].f);
    expect(f[2].f).toBeLessThan(f[1].f);
    expect(1 - f[2].f / f0).toBeGreaterThan(0.03);
  }, 60_000);
});
