// Four hyperbolic rods x² − y² = ±r0² (truncated at 3 r0) solved on planar grids of three spacings
// against the ideal quadrupole kernel (sim/stages/quadrupole), whose field Φ = (U + V cos θ)(x² − y²)/r0²
// is the one such rods make in the limit of untruncated rods (Dawson, Quadrupole Mass Spectrometry
// and its Applications, 1976, ch. 2). Truncation and the grounded box change the quadrupole
// strength slightly, so the ideal kernel runs at the effective r0 of the solved field, r_ref/√A₂
// with A₂ the n = 2 coefficient fitted on r_ref (sim/fields/multipoles.ts); what remains are the
// solve's discretisation error and the higher harmonics the four-fold rods allow (n = 6, 10, …).
// Rods truncated at 3 r0 leave only narrow slots towards the grounded box (the rods' surfaces
// approach the diagonals), so the box barely reaches the aperture: the fitted A₆/A₂ is ~1e-11.
// The finite-volume Laplacian with Shortley–Weller boundary rows is exact for quadratic potentials
// (its truncation error involves third and higher derivatives: Shortley & Weller, J. Appl. Phys. 9
// (1938) 334), so at every spacing the solved field is the ideal one to the solver's tolerance and
// the trajectories agree to ~1e-8. The error cannot fall with the spacing there; convergence is
// shown on rods cut at 1.5 r0 instead, whose wide slots let the box in (a field that is not
// quadratic): the trajectory's difference from that of the next finer grid falls with each
// halving. A second-order solve would give 4× per halving (Hackbusch, Elliptic Differential
// Equations, §4.8); seen here: 2.7× (order ≈ 1.4, with the O(h) boundary rows of assemble.ts and
// the field near the rods' ends entering), so the check holds more than first order: > 2×.

import { beforeAll, describe, expect, it } from 'vitest';
import { Exit } from '../../sim/core/cursor.js';
import type { Scene } from '../../sim/scene/types.js';
import { fitMultipoles } from '../../sim/fields/multipoles.js';
import { cacheKey, cacheRoot, readCached } from '../../sim/fields/cache.js';
import { DEFAULT_TOLERANCE } from '../../sim/fields/solve.js';
import { fieldProblemOf } from '../../sim/stages/registry.js';
import type { QuadrupoleStage, Stage } from '../../sim/stages/types.js';
import { ATOMIC_MASS_UNIT, ELEMENTARY_CHARGE } from '../../sim/units/constants.js';
import { context, cursor, trackIon, privateFieldCache, solvedScene } from './helpers.js';

const R0 = 4e-3, F = 1.2e6, U = 0, V = 400;
const rods = (spacing: string, truncate = '12 mm') => `name: Skerry hyperbolic rod check
stages:
  - type: electrodes
    length: 100 mm
    grid: { symmetry: planar, spacing: ${spacing}, half_width: 14 mm, reference_radius: 2 mm, mirror: [x, y] }
    rf: { amplitude: ${V} V, frequency: 1.2 MHz }
    electrodes:
      - name: rods x
        potential: { dc: ${U} V, rf: 1 }
        shapes:
          - hyperbola: { vertex: 4 mm, angle: 0 deg, truncate: ${truncate} }
          - hyperbola: { vertex: 4 mm, angle: 180 deg, truncate: ${truncate} }
      - name: rods y
        potential: { dc: ${-U} V, rf: -1 }
        shapes:
          - hyperbola: { vertex: 4 mm, angle: 90 deg, truncate: ${truncate} }
          - hyperbola: { vertex: 4 mm, angle: 270 deg, truncate: ${truncate} }
ions:
  - { mz: 500, count: 1 }
`;

const m = 500 * ATOMIC_MASS_UNIT, q = ELEMENTARY_CHARGE;
const SPACINGS = ['0.4 mm', '0.2 mm', '0.1 mm'];
const FINE = ['0.4 mm', '0.2 mm', '0.1 mm', '0.05 mm'];
const scenes: Scene[] = [];
const cut: Scene[] = [];

beforeAll(async () => {
  privateFieldCache();
  for (const s of SPACINGS) scenes.push(await solvedScene(rods(s)));
  for (const s of FINE) cut.push(await solvedScene(rods(s, '6 mm')));
}, 120_000);

/** r_ref/√A₂ of the rf sum (rods at +1 and −1 V), fitted on the solved grid. */
function effectiveR0(st: Stage): number {
  const p = fieldProblemOf(st)!;
  const sol = readCached(cacheRoot(), cacheKey(p, DEFAULT_TOLERANCE))!;
  const rf = { ...p, electrodes: p.electrodes.map((e) => ({ ...e, potential: { dc: e.potential.rf, rf: 0, aux: 0 } })) };
  const a2 = fitMultipoles(sol, rf, { nMax: 10 }).find((t) => t.n === 2)!.cos_v;
  return p.grid.referenceRadius! / Math.sqrt(a2);
}

/** Transverse positions of the same ion at every 1/8 RF period for 30 periods through a stage. */
function path(st: Stage): Float64Array {
  const out = new Float64Array(2 * 240);
  const c = cursor(m, q, 0.5 * R0, -0.4 * R0, 0, 40, 25, 2000);
  for (let k = 0; k < 240; k++) {
    const code = trackIon(st, c, context(((k + 1) / 8) / F), 40, 1e-9);
    expect(code).toBe(Exit.time);
    out[2 * k] = c.x; out[2 * k + 1] = c.y;
  }
  return out;
}

/** Largest |a − b| over the largest |b|. */
function relative(a: Float64Array, b: Float64Array): number {
  let big = 0, err = 0;
  for (let k = 0; k < a.length; k++) { big = Math.max(big, Math.abs(b[k])); err = Math.max(err, Math.abs(a[k] - b[k])); }
  return err / big;
}

describe('solved hyperbolic rods against the ideal quadrupole kernel', () => {
  it('trajectories agree within 1e-6 of the largest excursion at every spacing (issue 13: 1e-4)', () => {
    const errors: number[] = [];
    for (const sc of scenes) {
      const st = sc.stages[0];
      const r0 = effectiveR0(st);
      const ideal: QuadrupoleStage = { type: 'quadrupole', r0, length: 0.1, rf: { amplitude: V, frequency: F, phase: 0 }, dc: U, zStart: 0, zEnd: 0.1 } as QuadrupoleStage;
      errors.push(relative(path(st), path(ideal)));
    }
    console.log('hyperbolic rods vs ideal kernel: max |Δ| / max excursion at', SPACINGS.join(', '), '→', errors.map((e) => e.toExponential(2)).join(', '));
    // Issue 13 asks 1e-4; the exactness for quadratics above gives far less, so 1e-6 is held.
    for (const e of errors) expect(e).toBeLessThan(1e-6);
  });

  it('rods cut at 1.5 r0: the trajectory converges faster than first order in the spacing', () => {
    const paths = cut.map((sc) => path(sc.stages[0]));
    const d = [0, 1, 2].map((i) => relative(paths[i], paths[i + 1]));
    console.log('rods cut at 1.5 r0: difference to the next finer grid at', FINE.slice(0, 3).join(', '), '→', d.map((e) => e.toExponential(2)).join(', '));
    // Seen 2.66 and 2.73 (0.4 → 0.05 mm); first order would be 2.
    expect(d[0] / d[1]).toBeGreaterThan(2.2);
    expect(d[1] / d[2]).toBeGreaterThan(2.2);
    expect(d[2]).toBeLessThan(1e-3);
  });
});
