// Cooling per species: the history of each population (history_species.arrow) adds up to the
// whole cloud's (history.arrow), and in helium the lighter ion cools faster. An elastic collision
// with a gas atom at rest takes on average the fraction 2mM/(m + M)² of the ion's energy (elastic
// collision kinematics, hard spheres with isotropic scattering; E. W. McDaniel and E. A. Mason,
// The Mobility and Diffusion of Ions in Gases, 1973 — from memory): 0.074 for m/z 100 in He against
// 0.013 for m/z 609, so τ(100) must come out well below τ(609).
import { describe, it, expect, afterAll } from 'vitest';
import { readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { parseScene } from '../../sim/scene/load.js';
import { runScene } from '../../sim/runs/run-scene.js';
import { readHistory, readSpeciesHistory } from '../../sim/runfolder/index.js';
import { ROOT, tempDir } from '../helpers/cli.js';

const tmp = tempDir('iontrail-cool-');
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

describe('cooling per species', () => {
  it('sums to the whole cloud and cools m/z 100 faster than m/z 609 in helium', async () => {
    const text = readFileSync(join(ROOT, 'scenes/t7-trap-cooling.yaml'), 'utf8');
    // 80 ions each and 2 ms keep the test short; the time constants are ~0.3 and ~1 ms.
    const scene = parseScene(text, 't7.yaml', { set: ['ions.0.count=80', 'ions.1.count=80', 'run.max_time=2ms', 'run.record_every=0'] });
    const s = await runScene(scene, { out: join(tmp, 'run'), workers: 1 });
    const whole = readHistory(join(tmp, 'run'))!, sp = readSpeciesHistory(join(tmp, 'run'))!;
    const K = whole.t.length;
    expect(sp.t.length).toBe(2 * K);
    for (const k of [0, Math.floor(K / 3), K - 1]) {
      const n0 = sp.n_alive[k], n1 = sp.n_alive[K + k];
      expect(n0 + n1).toBe(whole.n_alive[k]);
      // Weighted mean energies reproduce the whole cloud's (sums of the same terms, rounding only).
      expect(Math.abs((n0 * sp.mean_ke_ev[k] + n1 * sp.mean_ke_ev[K + k]) / whole.n_alive[k] - whole.mean_ke_ev[k])).toBeLessThan(1e-9 * whole.mean_ke_ev[k]);
    }
    const species = (s.cooling as { species: { mz: number; tau_s: number }[] }).species;
    const tau = (mz: number) => species.find((x) => x.mz === mz)!.tau_s;
    expect(tau(100)).toBeGreaterThan(0);
    expect(tau(100) * 2).toBeLessThan(tau(609));
  }, 120_000);
});
