// Round rods of radius R = 1.13 r0 (r0 = 4 mm) in a grounded box, solved on a planar grid. Near
// the axis the field is Φ = A₂(U + V cos Ωt)(x² − y²)/r0² plus higher harmonics (A₆, A₁₀, … for
// four-fold rods), so for small excursions the ion obeys the Mathieu equation with a and q
// multiplied by A₂, and the whole stability diagram, its apex (a, q) = (0.23699, 0.70600)
// included, moves to (a/A₂, q/A₂) in the nominal parameters (Douglas & Konenkov, Rapid Commun.
// Mass Spectrom. 16 (2002) 1425; the apex values from memory, checked against
// sim/mathieu/boundaries.ts quadrupoleApex). A₂ is the n = 2 coefficient fitted on the solved grid
// (sim/fields/multipoles.ts). Checked: β_x of an ion with small x excursions, from once-per-period
// samples (z_{k+1} + z_{k−1} = 2 cos(πβ) z_k for a Floquet solution, McLachlan 1947, ch. 4),
// equals the Floquet β at (A₂ a, A₂ q) within 2e-4, and differs from β at (a, q) by more.

import { beforeAll, describe, expect, it } from 'vitest';
import { Exit } from '../../sim/core/cursor.js';
import type { Scene } from '../../sim/scene/types.js';
import { fitMultipoles } from '../../sim/fields/multipoles.js';
import { cacheKey, cacheRoot, readCached } from '../../sim/fields/cache.js';
import { DEFAULT_TOLERANCE } from '../../sim/fields/solve.js';
import { floquet } from '../../sim/mathieu/floquet.js';
import { quadrupoleApex } from '../../sim/mathieu/boundaries.js';
import { fieldProblemOf } from '../../sim/stages/registry.js';
import { ATOMIC_MASS_UNIT, ELEMENTARY_CHARGE } from '../../sim/units/constants.js';
import { context, cursor, trackIon, privateFieldCache, solvedScene } from './helpers.js';

const R0 = 4e-3, F = 1.2e6, MZ = 500;
const m = MZ * ATOMIC_MASS_UNIT, q = ELEMENTARY_CHARGE, OM = 2 * Math.PI * F;
// Nominal a and q of the x motion (DESIGN.md: a = 8eU/(m r0² Ω²), q = 4eV/(m r0² Ω²)).
const A = 0.1, Q = 0.6;
const U = (A * m * R0 * R0 * OM * OM) / (8 * q), V = (Q * m * R0 * R0 * OM * OM) / (4 * q);

const RODS = `name: Skerry round-rod check
stages:
  - type: electrodes
    length: 100 mm
    grid: { symmetry: planar, spacing: 0.05 mm, half_width: 16 mm, reference_radius: 2 mm, mirror: [x, y] }
    rf: { amplitude: ${V} V, frequency: 1.2 MHz }
    electrodes:
      - name: rods x
        potential: { dc: ${U} V, rf: 1 }
        shapes:
          - circle: { center: [8.52 mm, 0 mm], radius: 4.52 mm }
          - circle: { center: [-8.52 mm, 0 mm], radius: 4.52 mm }
      - name: rods y
        potential: { dc: ${-U} V, rf: -1 }
        shapes:
          - circle: { center: [0 mm, 8.52 mm], radius: 4.52 mm }
          - circle: { center: [0 mm, -8.52 mm], radius: 4.52 mm }
ions:
  - { mz: ${MZ}, count: 1 }
`;

let scene: Scene, series: Scene;
let a2 = 0;

beforeAll(async () => {
  privateFieldCache();
  scene = await solvedScene(RODS);
  series = await solvedScene(RODS.replace('    length: 100 mm\n', '    length: 100 mm\n    field_path: multipole\n'));
  const p = fieldProblemOf(scene.stages[0])!;
  const sol = readCached(cacheRoot(), cacheKey(p, DEFAULT_TOLERANCE))!;
  const rf = { ...p, electrodes: p.electrodes.map((e) => ({ ...e, potential: { dc: e.potential.rf, rf: 0, aux: 0 } })) };
  const c2 = fitMultipoles(sol, rf, { nMax: 10 }).find((t) => t.n === 2)!.cos_v;
  a2 = c2 * (R0 / p.grid.referenceRadius!) ** 2;
}, 120_000);

function betaOf(z: number[]): number {
  let num = 0, den = 0;
  for (let k = 1; k + 1 < z.length; k++) { num += z[k] * (z[k + 1] + z[k - 1]); den += 2 * z[k] * z[k]; }
  return Math.acos(num / den) / Math.PI;
}

describe('round rods at R/r0 = 1.13: the Mathieu diagram scales with the solved A₂', () => {
  it('β_x follows (A₂ a, A₂ q), so the apex moves to (a, q)/A₂', () => {
    const st = scene.stages[0];
    // x excursions of 0.05 r0: the A₆ term weighs (0.05)⁴ ≈ 6e-6 of the quadrupole there.
    const c = cursor(m, q, 0.05 * R0, 0, 0, 0, 0, 100);
    const x: number[] = [c.x];
    for (let k = 1; k <= 150; k++) {
      expect(trackIon(st, c, context(k / F), 40, 1e-9)).toBe(Exit.time);
      x.push(c.x);
    }
    const beta = betaOf(x);
    const scaled = floquet(A2(A), A2(Q)).beta!, nominal = floquet(A, Q).beta!;
    const apex = quadrupoleApex();
    console.log(`round rods R/r0 = 1.13: A2 = ${a2.toFixed(5)}; β_x solved ${beta.toFixed(5)}, Floquet at (A2 a, A2 q) ${scaled.toFixed(5)}, at (a, q) ${nominal.toFixed(5)}; apex moves from (${apex.a.toFixed(5)}, ${apex.q.toFixed(5)}) to (${(apex.a / a2).toFixed(5)}, ${(apex.q / a2).toFixed(5)})`);
    expect(Math.abs(beta - scaled)).toBeLessThan(2e-4);
    expect(Math.abs(beta - nominal)).toBeGreaterThan(5 * Math.abs(beta - scaled));
  });
});

describe('the multipole path of a rod set of constant cross-section', () => {
  // The fitted series (20 orders on r_ref = 2 mm = r0/2) against the interpolated grid it was fitted
  // from: the two differ by the grid interpolation's O(h⁴) error and the series' truncation, both
  // far below 1e-4 of the excursion inside the reference circle; provenance names the path.
  it('tracks the same trajectory as the grid within 1e-4 of the largest excursion, and says so', () => {
    expect(series.stages[0]).toMatchObject({ field_path: { path: 'multipole series', orders: 20, reference_radius_m: 0.002 } });
    expect(scene.stages[0]).toMatchObject({ field_path: { path: 'interpolated grid' } });
    const paths = [scene, series].map((sc) => {
      const c = cursor(m, q, 0.3 * R0, -0.2 * R0, 0, 30, -20, 100);
      const out: number[] = [];
      for (let k = 1; k <= 100; k++) {
        expect(trackIon(sc.stages[0], c, context(k / F), 40, 1e-9)).toBe(Exit.time);
        out.push(c.x, c.y);
      }
      return out;
    });
    let big = 0, err = 0;
    for (let k = 0; k < paths[0].length; k++) { big = Math.max(big, Math.abs(paths[0][k])); err = Math.max(err, Math.abs(paths[0][k] - paths[1][k])); }
    console.log(`round rods: multipole path vs grid, max |Δ| / max excursion ${(err / big).toExponential(2)}`);
    expect(err / big).toBeLessThan(1e-4);
  });
});

function A2(v: number): number {
  return a2 * v;
}
