// A cloud thermalised in helium inside an RF-only octupole guide settles, at small η, into the
// Boltzmann distribution of its effective potential (D. Gerlich, Adv. Chem. Phys. 82, 1 (1992),
// sec. II: a heavy ion in a light gas at η ≪ 1 sees V*(r) as a static potential):
//   density ∝ exp(−V*(r)/kT),  V*(r) = n² q² V² / (4 m Ω² r0²) · (r/r0)^(2n−2).
// In the plane, u = V*(r)/kT of each ion then follows a Gamma distribution of shape 1/(n−1)
// (p(r) dr ∝ r e^(−A r^(2n−2)) dr, substituted u = A r^(2n−2)), whose distribution function is
// the regularised lower incomplete gamma P(1/(n−1), u), summed here by its series (Press et al.,
// Numerical Recipes 3rd ed., 2007, eq. 6.2.5). The sample is compared with it by the one-sample
// Kolmogorov–Smirnov test (same book, §14.3.3); p = 0.001 is the threshold, D_crit = 1.949/√N
// from the Kolmogorov limit. Positions are read at an RF phase where cos Ωt = 0, where the
// micromotion displacement −qE cos(Ωt)/(mΩ²) vanishes (all ions start at RF phase 0).
// The same samples against a temperature 30 % off must fail the test (the test has the power).
import { describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { parseScene } from '../../sim/scene/load.js';
import { runScene } from '../../sim/runs/run-scene.js';
import { readIons } from '../../sim/runfolder/reader.js';
import { tempDir } from '../helpers/temp.js';

const kB = 1.380649e-23, e = 1.602176634e-19, u = 1.66053906660e-27;

/** Regularised lower incomplete gamma P(a, x) by its series (Numerical Recipes eq. 6.2.5). */
function gammaP(a: number, x: number, gammaA: number): number {
  if (x <= 0) return 0;
  let term = 1 / a, sum = term;
  for (let k = 1; k < 500; k++) { term *= x / (a + k); sum += term; if (term < sum * 1e-15) break; }
  return (sum * Math.exp(-x + a * Math.log(x))) / gammaA;
}
// Γ(1/3) = 2.6789385347077476 (from memory; the check below that P(1/3, 40) = 1 guards it).
const GAMMA_THIRD = 2.6789385347077476;

function ksDistance(samples: number[], cdf: (x: number) => number): number {
  const s = [...samples].sort((a, b) => a - b), N = s.length;
  let d = 0;
  for (let i = 0; i < N; i++) { const F = cdf(s[i]); d = Math.max(d, Math.abs(F - i / N), Math.abs((i + 1) / N - F)); }
  return d;
}

// Skerry CG-8-like octupole guide (fictional): r0 2.5 mm, 2 MHz, 50 V zero-to-peak, m/z 500, He
// at 10 Pa and 300 K. V*(r0) ≈ 1.9 eV ≈ 75 kT, and η(r) = 0.23 (r/r0)²: below 0.1 for r < 0.65 r0,
// where the cloud's 5 kT contour lies.
const n = 4, r0 = 2.5e-3, f = 2e6, V = 50, mz = 500, T = 300;
const m = mz * u, W = 2 * Math.PI * f;
const vStarR0 = (n * n * e * e * V * V) / (4 * m * W * W * r0 * r0);
const eta = (r: number) => ((2 * n * (n - 1) * e * V) / (m * W * W * r0 * r0)) * (r / r0) ** (n - 2);

async function cloud(model: string, count: number): Promise<number[]> {
  const dir = join(tempDir(), 'run');
  // 100 RF periods + a quarter (phase π/2 at the end): ~300 hard-sphere collisions per ion, past
  // the ~60 a m/z 500 ion needs to forget its start (energy loss ~2·4/500 per collision), and ~10
  // velocity-relaxation times of the drag model (γ = q/(mK) ≈ 2e5/s). The start (0.5 mm spread,
  // 0.04 eV) is near the cloud's own size. 20 steps per RF period: RK4's error per period at
  // η ≈ 0.1 is far below the statistics (the kernels' own tests bound it).
  await runScene(parseScene(`
seed: 31
stages:
  - { type: multipole, poles: ${2 * n}, length: 1 m, r0: ${r0 * 1e3} mm, rf: { amplitude: ${V} V, frequency: ${f / 1e6} MHz } }
gas: { species: He, pressure: 10 Pa, temperature: ${T} K, model: ${model}, cross_section: 200 A^2 }
ions:
  - { mz: ${mz}, count: ${count}, position: { z: 0.5 m, spread: 0.5 mm }, energy: 0.04 eV, direction: isotropic, rf_phase: 0 deg }
run: { max_time: 50.125 us, steps_per_cycle: 20, record_every: 0 }
`, 'cg8-cloud.yaml'), { out: dir, workers: 1 });
  const ions = readIons(dir);
  expect(ions.fate.every((x) => x === 'alive')).toBe(true);
  return Array.from(ions.end_x, (x, i) => Math.hypot(x, ions.end_y[i]));
}

describe('octupole guide in helium: Boltzmann cloud in the effective potential (Gerlich 1992)', () => {
  it('the incomplete-gamma series sums to 1 at large x (guards Γ(1/3))', () => {
    expect(Math.abs(gammaP(1 / 3, 40, GAMMA_THIRD) - 1)).toBeLessThan(1e-9);
  });
  for (const [model, count] of [['hard-sphere', 3000], ['drag', 2000]] as const) {
    it(`${model}: V*(r)/kT follows Gamma(1/(n−1)) by the KS test at p = 0.001, η < 0.1 for 95 % of ions`, async () => {
      const r = await cloud(model, count);
      const sorted = [...r].sort((a, b) => a - b);
      expect(eta(sorted[Math.floor(0.95 * r.length)])).toBeLessThan(0.1);
      const uOf = (temp: number) => r.map((x) => (vStarR0 * (x / r0) ** (2 * n - 2)) / (kB * temp));
      const cdf = (x: number) => gammaP(1 / (n - 1), x, GAMMA_THIRD);
      const dCrit = 1.949 / Math.sqrt(r.length);
      const d = ksDistance(uOf(T), cdf);
      expect(d).toBeLessThan(dCrit);
      // 30 % off in temperature: rejected.
      expect(ksDistance(uOf(1.3 * T), cdf)).toBeGreaterThan(dCrit);
      expect(ksDistance(uOf(T / 1.3), cdf)).toBeGreaterThan(dCrit);
      console.log(`${model}: N ${r.length}, D ${d.toFixed(4)} (D_crit ${dCrit.toFixed(4)}), η(r95) ${eta(sorted[Math.floor(0.95 * r.length)]).toFixed(3)}, D at 1.3 T ${ksDistance(uOf(1.3 * T), cdf).toFixed(4)}`);
    });
  }
});
