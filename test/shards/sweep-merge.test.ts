// `iontrail sweep --shard I/N` and `iontrail merge`: sweep.csv and summary.json of the merge are
// the unsharded sweep's bytes (summary.json apart from the wall times, the command and the parts),
// for N below, equal to and above the number of points (above: point × ion ranges), on the
// transfer-matrix path and by direct integration, parts on 1 and 2 workers. The reference is the
// unsharded sweep of the same build.

import { describe, expect, it } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { iontrail, tempDir } from '../helpers/cli.js';
import { cli, expectSameFigures, expectSameFolder, writeParts } from './compare.js';

// Ideal filter and drift only: linear, so `auto` takes the matrix path.
const LINEAR = `
name: Skerry QF-4 sweep shard check
seed: 5
stages:
  - type: quadrupole
    length: 100 mm
    r0: 4 mm
    rf: { amplitude: 832 V, frequency: 1.2 MHz }
    dc: 138.3 V
ions:
  - mz: 502
    count: 300
    position: { spread: 0.1 mm }
    energy: 5 eV
    energy_spread: 0.2 eV
    angle_spread: 1 deg
run: { steps_per_cycle: 20, max_time: 100 us, record_every: 0 }
`;

function setup() {
  const d = tempDir();
  const scene = join(d, 'scene.yaml');
  writeFileSync(scene, LINEAR);
  return { d, scene };
}

describe('sweep shards merge into the unsharded bytes', () => {
  // Point ranges of uneven size (3 shards), one point each (4) and point × ion ranges (9).
  it('matrix path: 4 points in 3, 4 and 9 shards (9: point × ion ranges), and the sweep figure', async () => {
    const { d, scene } = setup();
    const args = [scene, '--vary', 'mz=498..506:4'];
    const full = join(d, 'full');
    cli(['sweep', ...args, '-o', full]);
    for (const n of [3, 4, 9]) {
      const parts = writeParts('sweep', args, n, d, (i) => 1 + (i % 2));
      const m = JSON.parse(readFileSync(join(parts[n - 1], 'shard.json'), 'utf8'));
      // 9 shards over 4 points: ⌈9/4⌉ = 3 ion blocks per point, 12 units.
      if (n === 9) expect([m.blocks_per_point, m.units.total]).toEqual([3, 12]);
      const merged = join(d, `m${n}`);
      cli(['merge', ...parts, '-o', merged]);
      expectSameFolder(full, merged, 'sweep');
    }
    await expectSameFigures(full, join(d, 'm9'), d, { columns: ['transmission'] });
    expect(JSON.parse(readFileSync(join(full, 'summary.json'), 'utf8')).peak).not.toBeNull();
  }, 120_000);

  it('direct integration, two keys (6 points): 3 and 7 shards (7: point × ion ranges)', () => {
    const { d, scene } = setup();
    const args = [scene, '--vary', 'mz=500..504:3', '--vary', 'stages.0.dc=137V..138V:2', '--method', 'direct', '--set', 'ions.0.count=40', '--set', 'run.max_time=20us'];
    const full = join(d, 'full');
    cli(['sweep', ...args, '-o', full, '--workers', '2']);
    for (const n of [3, 7]) {
      const parts = writeParts('sweep', args, n, d, (i) => 1 + (i % 2));
      const merged = join(d, `m${n}`);
      cli(['merge', ...parts, '-o', merged]);
      expectSameFolder(full, merged, 'sweep');
    }
    expect(JSON.parse(readFileSync(join(full, 'summary.json'), 'utf8')).method.used).toBe('direct');
  }, 120_000);

  it('scan lines (scan-lines.csv, scan-line-points.csv): 5 shards', () => {
    const { d, scene } = setup();
    const args = [scene, '--vary', 'mz=496..508:9', '--scan-lines', '0.160..0.166:3'];
    const full = join(d, 'full');
    cli(['sweep', ...args, '-o', full]);
    const parts = writeParts('sweep', args, 5, d, () => 1);
    const merged = join(d, 'm');
    cli(['merge', ...parts, '-o', merged]);
    expectSameFolder(full, merged, 'sweep');
    expect(JSON.parse(readFileSync(join(full, 'summary.json'), 'utf8')).scan_lines.tradeoff).toHaveLength(3);
  }, 120_000);

  it('--collect needs whole points: more shards than points is refused', () => {
    const { d, scene } = setup();
    const r = iontrail(['sweep', scene, '--vary', 'mz=500..504:3', '--collect', 'ions.detected', '--shard', '0/4', '-o', join(d, 'p')]);
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/3 points and --collect runs each point whole; give at most 3 shards/);
  });
});
