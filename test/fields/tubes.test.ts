// Two coaxial tubes of radius R touching at z = 0, at 0 and V: by separation of variables the axis
// potential is φ(0, z) = V/2 + (V/π) ∫₀^∞ sin(kz) / (k I₀(kR)) dk (e.g. Read, J. Phys. E 2 (1969)
// 165, for the two-tube lens; the integral here is evaluated by our own quadrature with the power
// series of I₀, Abramowitz & Stegun 9.6.12). The bound: within 1e-3 of V on the axis.
// Tubes run 6R either side (end effects ~ exp(−2.405·6) ≈ 6e-7), closed at the far end of the V tube.
import { describe, expect, it } from 'vitest';
import { solveField, type FieldProblem } from '../../sim/fields/index.js';

/** I₀(x) = Σ (x/2)^(2m) / (m!)² (A&S 9.6.12); all terms positive, so no cancellation. */
function besselI0(x: number): number {
  const q = (x * x) / 4;
  let term = 1, sum = 1;
  for (let m = 1; m < 500 && term > 1e-17 * sum; m++) { term *= q / (m * m); sum += term; }
  return sum;
}

/** V/2 + (V/π)∫₀^K sin(kz)/(k I₀(kR)) dk, composite Simpson; beyond K = 60/R the integrand is < e^-60. */
function axisPotential(z: number, R: number): number {
  const K = 60 / R, n = 12000, dk = K / n;
  const f = (k: number) => (k === 0 ? z : Math.sin(k * z) / (k * besselI0(k * R)));
  let s = f(0) + f(K);
  for (let i = 1; i < n; i++) s += (i % 2 === 1 ? 4 : 2) * f(i * dk);
  return 0.5 + ((s * dk) / 3) / Math.PI;
}

// The tubes touch at z0, half a spacing before a node plane: a node exactly at the singular circle
// (r = R, z = z0) would belong to one tube and shift the gap by up to h/2 (≈ 2e-2 V here).
const R = 1e-3, h = R / 16, half = 6 * R, L = 2 * half, wall = 4 * h, z0 = half - h / 2;

describe('two tubes touching at z = 0: φ(0, z) = V/2 + (V/π)∫ sin(kz)/(k I₀(kR)) dk', () => {
  it('the quadrature reproduces the limits (φ → 0, V/2, V)', () => {
    expect(axisPotential(0, R)).toBeCloseTo(0.5, 12);
    expect(axisPotential(4 * R, R)).toBeGreaterThan(0.9999);
    expect(axisPotential(-4 * R, R)).toBeLessThan(1e-4);
  });
  it('axis potential within 1e-3 of V from z = −2R to 2R', async () => {
    const problem: FieldProblem = {
      grid: { symmetry: 'axial', spacing: h, radius: R + wall, length: L, mirror: [] },
      electrodes: [
        { name: 'low', potential: { dc: 0, rf: 0, aux: 0 }, shapes: [{ kind: 'tube', innerRadius: R, outerRadius: R + 2 * wall, from: -h, to: z0 - 1e-9 * R }], holes: [] },
        { name: 'high', potential: { dc: 1, rf: 0, aux: 0 }, shapes: [
          { kind: 'tube', innerRadius: R, outerRadius: R + 2 * wall, from: z0, to: L + h },
          { kind: 'disc', at: L, thickness: 2 * h, radius: R + 2 * wall, hole: 0 },
        ], holes: [] },
      ],
    };
    const s = await solveField(problem, { workers: 1 });
    const [nr] = s.grid.shape;
    let worst = 0;
    for (let j = Math.round((z0 - 2 * R) / h); j <= Math.round((z0 + 2 * R) / h); j++) {
      worst = Math.max(worst, Math.abs(s.units[1][nr * j] - axisPotential(j * h - z0, R)));
    }
    expect(worst).toBeLessThanOrEqual(1e-3);
  });
});
