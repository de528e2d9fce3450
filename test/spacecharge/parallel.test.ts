// Worker-count independence of the direct sum and the tree (DESIGN.md: same scene + seed ⇒ same bytes,
// whatever the number of workers). Needs dist/ (npm test builds it first).
import { describe, it, expect } from 'vitest';
import { ELEMENTARY_CHARGE, ionMassKg } from '../../sim/units/constants.js';
import { directField, type FieldOut } from '../../sim/spacecharge/direct.js';
import { ParallelDirect } from '../../sim/spacecharge/parallel.js';
import { ParallelTree } from '../../sim/spacecharge/parallel-tree.js';
import { CoulombTree } from '../../sim/spacecharge/tree.js';
import { runEnsemble } from '../../sim/spacecharge/ensemble-step.js';
import { gaussianCloud } from './clouds.js';

const field = (n: number): FieldOut => ({ ex: new Float64Array(n), ey: new Float64Array(n), ez: new Float64Array(n) });

describe('parallel direct sum', () => {
  it('gives the same bits with 1, 2 and 3 threads as the serial sum, field and trajectories', async () => {
    const m = ionMassKg(100, 1), q = ELEMENTARY_CHARGE;
    const e = gaussianCloud(999, 100e-6, 200e-6, m, q, 5);
    const c = { n: e.n, x: e.x, y: e.y, z: e.z, qs: e.charge };
    const ref = field(e.n);
    directField(c, 1e-9, ref);
    for (const threads of [1, 2, 3]) {
      const pd = await ParallelDirect.create(threads, e.n);
      try {
        const got = field(e.n);
        pd.field(c, 1e-9, got);
        for (let i = 0; i < e.n; i++) {
          expect(got.ex[i]).toBe(ref.ex[i]); expect(got.ey[i]).toBe(ref.ey[i]); expect(got.ez[i]).toBe(ref.ez[i]);
        }
        // A short coupled run: final positions identical to the serial run.
        const a = gaussianCloud(300, 50e-6, 50e-6, m, q, 6), b = gaussianCloud(300, 50e-6, 50e-6, m, q, 6);
        const o = { tEnd: 1e-6, h: 2e-8, external: { kind: 'none' as const } };
        runEnsemble(a, { ...o, spaceCharge: { method: 'direct', weight: 3 } });
        runEnsemble(b, { ...o, spaceCharge: { method: 'direct', weight: 3, solver: pd } });
        for (let i = 0; i < a.n; i++) { expect(b.x[i]).toBe(a.x[i]); expect(b.vz[i]).toBe(a.vz[i]); }
      } finally {
        await pd.close();
      }
    }
  }, 60_000);
});

describe('parallel tree', () => {
  it('gives the same bits with 1, 2 and 3 threads as the serial tree (each target summed by one thread from lists fixed by the positions)', async () => {
    const m = ionMassKg(100, 1), q = ELEMENTARY_CHARGE;
    const e = gaussianCloud(3001, 100e-6, 300e-6, m, q, 7);
    const c = { n: e.n, x: e.x, y: e.y, z: e.z, qs: e.charge };
    const ref = field(e.n), direct = field(e.n);
    new CoulombTree({ theta: 0.5 }).field(c, 1e-9, ref);
    directField(c, 1e-9, direct);
    // A tree that fails to visit some leaves would leave zeros: compare with the direct sum too
    // (1 % RMS, the bound of tree.test.ts).
    let num = 0, den = 0;
    for (let i = 0; i < e.n; i++) {
      num += (ref.ex[i] - direct.ex[i]) ** 2 + (ref.ey[i] - direct.ey[i]) ** 2 + (ref.ez[i] - direct.ez[i]) ** 2;
      den += direct.ex[i] ** 2 + direct.ey[i] ** 2 + direct.ez[i] ** 2;
    }
    expect(Math.sqrt(num / den)).toBeLessThan(0.01);
    for (const threads of [1, 2, 3]) {
      const pt = await ParallelTree.create(threads, e.n, 0.5);
      try {
        for (const n of [e.n, 1000]) { // a smaller cloud after a larger one: no stale entries
          const cn = { ...c, n }, want = field(n), got = field(n);
          new CoulombTree({ theta: 0.5 }).field(cn, 1e-9, want);
          pt.field(cn, 1e-9, got);
          for (let i = 0; i < n; i++) {
            expect(got.ex[i]).toBe(want.ex[i]); expect(got.ey[i]).toBe(want.ey[i]); expect(got.ez[i]).toBe(want.ez[i]);
          }
        }
      } finally {
        await pt.close();
      }
    }
  }, 60_000);
});
