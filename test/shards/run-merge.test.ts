// `iontrail run --shard I/N` and `iontrail merge`: the merged folder is the unsharded run's bytes
// (DESIGN.md: same scene and seed give the same bytes, whatever the number of workers or shards).
// The reference is the unsharded run of the same build, so the check is independent of how the
// shards cut the work; parts run with 1 and 2 workers.

import { describe, expect, it } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { iontrail, tempDir } from '../helpers/cli.js';
import { cli, expectSameFigures, expectSameFolder, writeParts } from './compare.js';

// A filter with recorded trajectories and two populations (trajectories.arrow, history_species.arrow).
const FILTER = `
name: Skerry QF-4 shard check
seed: 7
stages:
  - type: quadrupole
    length: 60 mm
    r0: 4 mm
    rf: { amplitude: 600 V, frequency: 1.2 MHz }
    dc: 90 V
  - type: drift
    length: 10 mm
ions:
  - mz: 502
    count: 500
    position: { spread: 0.3 mm }
    energy: 5 eV
    energy_spread: 0.2 eV
    angle_spread: 1 deg
  - mz: 480
    count: 300
    position: { spread: 0.3 mm }
    energy: 5 eV
run: { steps_per_cycle: 20, max_time: 40 us, record_every: 200 }
`;

// A trap in helium (gas collisions keyed by ion: the cooling fit and the history from batch sums).
const TRAP = `
name: Skerry T-7 shard check, helium
seed: 11
stages:
  - type: trap
    r0: 7.07 mm
    rf: { amplitude: 400 V, frequency: 1.05 MHz }
gas: { species: He, pressure: 1 mTorr, temperature: 300 K, model: hard-sphere, cross_section: 150 A^2 }
ions:
  - mz: 609
    count: 120
    position: { spread: 0.5 mm }
    energy: 1 eV
    direction: isotropic
  - mz: 200
    count: 80
    position: { spread: 0.5 mm }
    energy: 1 eV
    direction: isotropic
run: { steps_per_cycle: 20, max_time: 30 us, record_every: 0, history_every: 1 us }
`;

function setup(text: string) {
  const d = tempDir();
  const scene = join(d, 'scene.yaml');
  writeFileSync(scene, text);
  return { d, scene };
}

describe('run shards merge into the unsharded bytes', () => {
  it('filter with trajectories: 3 shards and one shard per batch, parts on 1 and 2 workers, and its figures', async () => {
    const { d, scene } = setup(FILTER);
    const full = join(d, 'full');
    cli(['run', scene, '-o', full, '--workers', '2']);
    const batches = JSON.parse(readFileSync(join(full, 'summary.json'), 'utf8')).provenance.batch_size;
    const count = Math.ceil(800 / batches);
    expect(count, 'several batches to cut').toBeGreaterThan(3);
    for (const n of [3, count]) {
      const parts = writeParts('run', [scene], n, d, (i) => 1 + (i % 2));
      // A part is a run folder of its own: its summary counts its slice and says which it is.
      const s0 = JSON.parse(readFileSync(join(parts[0], 'summary.json'), 'utf8'));
      expect(s0.provenance.shard.index).toBe(0);
      expect(s0.provenance.shard.count).toBe(n);
      expect(s0.ions.total).toBe(s0.provenance.shard.ions[1] - s0.provenance.shard.ions[0]);
      const merged = join(d, `m${n}`);
      cli(['merge', ...parts, '-o', merged]);
      expectSameFolder(full, merged, 'run');
    }
    // The figures of a merge are the unsharded run's PNG bytes (their footer holds no time or folder).
    await expectSameFigures(full, join(d, `m${count}`), d, { kinds: ['traces', 'stability', 'phase'] });
  }, 120_000);

  it('more shards than batches is refused with the number of batches', () => {
    const { d, scene } = setup(FILTER);
    const r = iontrail(['run', scene, '--shard', '0/500', '-o', join(d, 'p')]);
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/the run has \d+ batches of \d+ ions .* give at most \d+ shards/);
  });

  it('trap in buffer gas: history, species history, cooling fit and their figures from 4 shards', async () => {
    const { d, scene } = setup(TRAP);
    const full = join(d, 'full');
    cli(['run', scene, '-o', full, '--workers', '1']);
    const parts = writeParts('run', [scene], 4, d, (i) => (i < 2 ? 2 : 1));
    const merged = join(d, 'm');
    cli(['merge', ...parts, '-o', merged]);
    expectSameFolder(full, merged, 'run');
    await expectSameFigures(full, merged, d, { kinds: ['cooling', 'energy', 'xy'] });
    expect(JSON.parse(readFileSync(join(merged, 'summary.json'), 'utf8')).cooling.collisions_per_ion, 'the gas acted').toBeGreaterThan(0);
  }, 120_000);
});
