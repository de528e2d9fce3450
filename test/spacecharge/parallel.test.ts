// Worker-count independence of the direct sum (DESIGN.md: same scene + seed ⇒ same bytes,
// whatever the number of workers). Needs dist/ (npm test builds it first).
import { describe, it, expect } from 'vitest';
import { ELEMENTARY_CHARGE, ionMassKg } from '../../sim/units/constants.js';
import { directField, type FieldOut } from '../../sim/spacecharge/direct.js';
import { ParallelDirect } from '../../sim/spacecharge/parallel.js';
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
