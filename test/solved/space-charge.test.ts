// Space charge through a solved stage (issue 14 with issue 13's fields): two ions move together
// through the static two-tube lens of lens.test.ts (0 V and −100 V tubes, 3 mm bore), each in the
// interpolated solved field and the Coulomb field of the other. The total energy
//   Σ (½ m v² + q Φ_lens) + z1 z2 e² / (4π ε0 |r1 − r2|)
// is conserved in a static field (any mechanics text, e.g. Goldstein, Classical Mechanics, 3rd ed.,
// §1.2; Coulomb's law with CODATA 2018 constants), so ions that end deep inside the second tube
// (Φ = −100 V there to below 1e-10 V per volt, see lens.test.ts) have together
//   KE₁ + KE₂ = 2 KE₀ + 2 q·100 V + k q² (1/d − 1/D),
// d and D their starting and final separations (the coupled stepper is Störmer–Verlet, so the
// balance holds to its second-order error at two step sizes).

import { afterAll, describe, expect, it } from 'vitest';
import { readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { iontrail } from '../helpers/cli.js';
import { tempDir } from '../helpers/temp.js';
import { privateFieldCache, TWO_TUBE_LENS_STAGE } from './helpers.js';
import { COULOMB_K } from '../../sim/spacecharge/direct.js';
import { ELEMENTARY_CHARGE, ELECTRONVOLT } from '../../sim/units/constants.js';

const cache = privateFieldCache();
const tmp = tempDir('iontrail-solved-sc-');
afterAll(() => { rmSync(tmp, { recursive: true, force: true }); rmSync(cache, { recursive: true, force: true }); });

const scene = (step: string) => `name: Skerry two-tube lens, ion pair with space charge
stages:
${TWO_TUBE_LENS_STAGE}space_charge: { method: direct, weight: 1, softening: 1 nm }
ions:
  - { mz: 100, count: 1, position: { z: 5 mm }, energy: 10 eV }
  - { mz: 100, count: 1, position: { z: 5.001 mm }, energy: 10 eV }
run: { max_time: 8 us, step_without_rf: ${step}, record_every: 0 }
`;

function energyError(step: string): { error: number; coulomb: number } {
  const f = join(tmp, `pair-${step.replace(' ', '')}.yaml`), out = f.replace(/\.yaml$/, '');
  writeFileSync(f, scene(step));
  const r = iontrail(['run', f, '-o', out, '--csv']);
  expect(r.code, r.stderr).toBe(0);
  const [head, ...rows] = readFileSync(join(out, 'ions.csv'), 'utf8').trim().split('\n');
  const keys = head.split(',');
  const ions = rows.map((w) => Object.fromEntries(w.split(',').map((v, k) => [keys[k], Number(v)])));
  expect(ions).toHaveLength(2);
  for (const i of ions) {
    // Deep inside the second tube, far from its grounded far face.
    expect(i.end_z).toBeGreaterThan(0.05);
    expect(i.end_z).toBeLessThan(0.1);
  }
  const D = Math.hypot(ions[1].end_x - ions[0].end_x, ions[1].end_y - ions[0].end_y, ions[1].end_z - ions[0].end_z);
  const d = 1e-6, q = ELEMENTARY_CHARGE;
  const ke = (ions[0].end_ke_ev + ions[1].end_ke_ev) * ELECTRONVOLT;
  const want = 2 * 10 * ELECTRONVOLT + 2 * q * 100 + COULOMB_K * q * q * (1 / d - 1 / D);
  expect(D).toBeGreaterThan(100 * d); // they have moved apart
  return { error: ke / want - 1, coulomb: (COULOMB_K * q * q * (1 / d - 1 / D)) / want };
}

describe('an ion pair with space charge through the solved two-tube lens', () => {
  it('conserves Σ(KE + qΦ) + Coulomb energy to 1e-7, a check that fails without the Coulomb term', () => {
    // 1 µm apart: the pair time √(4π ε0 μ d³/e²) is about 19 ns, so steps of 0.4 and 0.2 ns
    // resolve it; the released Coulomb energy, 1.4 meV, is 6.5e-6 of the total, 65 times the bound.
    const a = energyError('0.4 ns'), b = energyError('0.2 ns');
    // Printed so a regression shows its size, not only that it failed.
    console.log(`energy error: ${a.error.toExponential(2)} at 0.4 ns, ${b.error.toExponential(2)} at 0.2 ns; Coulomb share ${b.coulomb.toExponential(2)}`);
    expect(Math.abs(b.error)).toBeLessThan(1e-7);
    expect(Math.abs(a.error)).toBeLessThan(1e-7);
    expect(b.coulomb).toBeGreaterThan(50 * 1e-7);
  }, 120_000);
});
