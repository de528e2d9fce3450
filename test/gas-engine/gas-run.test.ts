// Buffer gas through `iontrail run` scenes (the kernels have their own tests in test/gas):
// - equipartition: ions in field-free helium reach mean kinetic energy 3/2 kT (kinetic theory);
// - drift velocity in a uniform field with the drag model equals K·E with K from the Mason–Schamp
//   low-field equation K = (3/16)(ze/N)(2π/(μkT))^½/Ω (Mason & McDaniel, Transport Properties of
//   Ions in Gases, 1988), written out here independently of sim/gas;
// - fact of the trade (common practice, no source): at about 1 mTorr of helium, ions of a few
//   hundred m/z in an RF trap cool within milliseconds — the T-7 demo scene, with τ reported;
// - same bytes for 1 and 2 workers with collisions on.

import { describe, expect, it } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { parseScene, loadSceneFile } from '../../sim/scene/load.js';
import { runScene } from '../../sim/runs/run-scene.js';
import { readIons } from '../../sim/runfolder/reader.js';
import { iontrail, tempDir, ROOT } from '../helpers/cli.js';

const kB = 1.380649e-23, e = 1.602176634e-19, u = 1.6605390666e-27;

describe('buffer gas in the engine', () => {
  it('thermalises ions in field-free helium to 3/2 kT within 3% (hard-sphere)', async () => {
    const dir = join(tempDir(), 'run');
    // 1 Torr: about 7e7 collisions/s; 40 µs is hundreds of collisions, far past the few dozen a
    // m/z 200 ion needs to forget its 1 eV start (energy loss ~2·4/200 per collision).
    await runScene(parseScene(`
seed: 8
stages:
  - { type: drift, length: 10 m }
gas: { species: He, pressure: 1 Torr, temperature: 300 K, model: hard-sphere, cross_section: 100 A^2 }
ions:
  - { mz: 200, count: 6000, position: { z: 5 m }, energy: 1 eV, direction: isotropic }
run: { max_time: 40 us, step_without_rf: 20 ns, record_every: 0 }
`, 'thermal.yaml'), { out: dir, workers: 1 });
    const ions = readIons(dir);
    expect(ions.fate.every((f) => f === 'alive')).toBe(true);
    const meanKe = ions.end_ke_ev.reduce((a, b) => a + b, 0) / ions.end_ke_ev.length;
    const expected = (1.5 * kB * 300) / e;
    // Standard error of the mean of a 3D Maxwellian energy: sqrt(2/3)/sqrt(6000) ≈ 1.1%; 3% ≈ 2.8σ.
    expect(Math.abs(meanKe - expected) / expected).toBeLessThan(0.03);
  });

  it('drifts at K·E in a uniform field with the drag model (Mason–Schamp K)', async () => {
    const dir = join(tempDir(), 'run');
    // 1 Torr He, m/z 300, σ = 120 Å², E = 10 V over 100 mm = 100 V/m (E/N ≈ 0.3 Td: low field).
    await runScene(parseScene(`
seed: 9
stages:
  - { type: accelerate, length: 100 mm, voltage: 10 V }
gas: { species: He, pressure: 1 Torr, temperature: 300 K, model: drag, cross_section: 120 A^2 }
ions:
  - { mz: 300, count: 400, position: { z: 10 mm }, energy: 0.0388 eV, direction: isotropic }
run: { max_time: 200 us, step_without_rf: 50 ns, record_every: 0 }
`, 'drift.yaml'), { out: dir, workers: 1 });
    const ions = readIons(dir);
    const N = 133.322368 / (kB * 300);
    const mu = (300 * u * 4.002602 * u) / (300 * u + 4.002602 * u);
    const K = (3 / 16) * (e / N) * Math.sqrt((2 * Math.PI) / (mu * kB * 300)) / 120e-20;
    // Mean displacement over the run / time: the ions relax to the drift velocity in ~m K/(ze) ≈ ns.
    let dz = 0;
    for (let i = 0; i < ions.ion.length; i++) dz += ions.end_z[i] - ions.z0[i];
    const vd = dz / ions.ion.length / 200e-6;
    // Diffusion spread: sqrt(2 D t) with D = K kT/e; the mean over 400 ions has a standard error
    // of sqrt(2Dt/400) ≈ 1% of the drift distance here; 3% tolerance.
    expect(Math.abs(vd - K * 100) / (K * 100)).toBeLessThan(0.03);
  });

  it('cools the T-7 demo trap within milliseconds and reports tau', async () => {
    const { scene } = loadSceneFile(join(ROOT, 'scenes/t7-trap-cooling.yaml'));
    const s = await runScene(scene, { out: join(tempDir(), 'run'), workers: 2 });
    const c = s.cooling as Record<string, number>;
    expect(c.tau_s).toBeGreaterThan(1e-4);
    expect(c.tau_s).toBeLessThan(3e-3);
    expect(c.final_mean_ke_ev).toBeLessThan(c.initial_mean_ke_ev / 5);
    expect(c.collisions_per_ion).toBeGreaterThan(50);
    expect(c.final_rms_radius_m).toBeGreaterThan(0);
  });

  it('gives the same bytes with 1 and 2 workers with collisions', () => {
    const d = tempDir();
    const f = join(d, 't.yaml');
    writeFileSync(f, readFileSync(join(ROOT, 'scenes/t7-trap-cooling.yaml'), 'utf8').replace('max_time: 4 ms', 'max_time: 0.3 ms').replace('count: 200', 'count: 300'));
    for (const w of ['1', '2']) expect(iontrail(['run', f, '-o', join(d, `w${w}`), '--workers', w]).code).toBe(0);
    for (const file of ['ions.arrow', 'trajectories.arrow', 'history.arrow']) {
      expect(readFileSync(join(d, 'w1', file)).equals(readFileSync(join(d, 'w2', file))), file).toBe(true);
    }
  });
});

describe('gas inside one stage', () => {
  it('collides only in the stage that holds the gas block', async () => {
    // 10 mTorr He, 100 Å²: rate nσ⟨g⟩ ≈ 2.4e20 m⁻³ · 1e-18 m² · 2.2 km/s ≈ 5e5 /s (kinetic theory,
    // ⟨g⟩ from the ion speed and the helium thermal speed): tens of collisions in 100 µs. The ions
    // (5 eV, m/z 300, 1.8 mm/µs) stay inside the 1 m first stage for the whole run, so gas in the
    // second stage must give none.
    const gas = ', gas: { species: He, pressure: 10 mTorr, temperature: 300 K, model: hard-sphere, cross_section: 100 A^2 }';
    const scene = (where: 0 | 1 | -1) => `
seed: 12
stages:
  - { type: drift, length: 1 m${where === 0 ? gas : ''} }
  - { type: drift, length: 40 mm${where === 1 ? gas : ''} }
ions:
  - { mz: 300, count: 200, energy: 5 eV }
run: { max_time: 100 us, step_without_rf: 20 ns, record_every: 0 }
`;
    const collisions = async (where: 0 | 1 | -1) => {
      const dir = join(tempDir(), 'run');
      await runScene(parseScene(scene(where), 'stage-gas.yaml'), { out: dir, workers: 1 });
      const ions = readIons(dir);
      expect(ions.end_stage.every((s) => s === 0)).toBe(true);
      return ions.collisions.reduce((a, b) => a + b, 0) / ions.collisions.length;
    };
    expect(await collisions(0)).toBeGreaterThan(10);
    expect(await collisions(1)).toBe(0);
    expect(await collisions(-1)).toBe(0);
  });
});
