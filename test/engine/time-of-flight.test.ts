// Acceleration gap + field-free drift against standard kinematics: a uniform field over d from
// rest takes t_gap = 2d/v, then the drift takes L/v with v = sqrt(2zeV/m) (e.g. Wiley & McLaren,
// Rev. Sci. Instrum. 26, 1150 (1955), eq. 1–3 with s0 = d). For m/z 1000, 20 kV, 1 m the drift
// time is about 16.1 µs (common practice, no source). The work done equals zeV.

import { describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { parseScene } from '../../sim/scene/load.js';
import { runScene } from '../../sim/runs/run-scene.js';
import { readIons } from '../../sim/runfolder/reader.js';
import { ionMassKg, ELEMENTARY_CHARGE } from '../../sim/units/constants.js';
import { tempDir } from '../helpers/cli.js';

const SCENE = (charge: number) => `
seed: 5
stages:
  - type: accelerate
    length: 5 mm
    voltage: 20 kV
  - type: drift
    length: 1 m
ions:
  - mz: 1000
    charge: ${charge}
    count: 4
    position: { z: 0 mm }
    energy: 0 eV
run: { max_time: 100 us, record_every: 0 }
`;

describe('time of flight through accelerate + drift', () => {
  it('arrives at t = 2d/v + L/v, drift ≈ 16.1 µs, to 1e-9', async () => {
    const dir = join(tempDir(), 'run');
    const s = await runScene(parseScene(SCENE(1), 'tof.yaml'), { out: dir, workers: 1 });
    expect(s.ions.detected).toBe(4);
    const ions = readIons(dir);
    const m = ionMassKg(1000, 1);
    const v = Math.sqrt((2 * ELEMENTARY_CHARGE * 20e3) / m);
    const drift = 1 / v;
    expect(drift * 1e6).toBeCloseTo(16.1, 1);
    const expected = (2 * 5e-3) / v + drift;
    for (let i = 0; i < 4; i++) expect(Math.abs(ions.end_time[i] - expected) / expected).toBeLessThan(1e-9);
  });

  it('conserves energy: final kinetic energy equals zeV to 1e-9 (and z = 2 doubles it)', async () => {
    for (const z of [1, 2]) {
      const dir = join(tempDir(), 'run');
      const s = await runScene(parseScene(SCENE(z), 'tof.yaml'), { out: dir, workers: 1 });
      const ions = readIons(dir);
      for (let i = 0; i < 4; i++) expect(Math.abs(ions.end_ke_ev[i] - z * 20e3) / (z * 20e3)).toBeLessThan(1e-9);
      expect(s.stats.max_energy_error as number).toBeLessThan(1e-9);
      expect(s.warnings.join(' ')).not.toMatch(/energy drift/);
    }
  });
});

describe('starts outside every stage', () => {
  it('counts ions drawn before the first stage as lost instead of failing', async () => {
    // position.z = 0 with spread_z 1 mm: about half the starts fall at z < 0, outside the scene.
    const s = await runScene(parseScene(`
seed: 2
stages:
  - { type: drift, length: 10 mm }
ions:
  - { mz: 100, count: 200, position: { z: 0 mm, spread_z: 1 mm }, energy: 1 eV }
run: { max_time: 100 us, record_every: 0 }
`, 'outside.yaml'), { out: join(tempDir(), 'run'), workers: 1 });
    expect(s.ions.total).toBe(200);
    expect(s.ions.hit).toBeGreaterThan(60);
    expect(s.ions.detected).toBeGreaterThan(60);
    expect(s.ions.hit + s.ions.detected).toBe(200);
  });
});
