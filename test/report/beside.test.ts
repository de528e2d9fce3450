// `iontrail report SCENE --beside OTHER --vary mz=A..B:N`, bad input: each refusal is one line
// naming what is wrong, exit 2, before any run, and no bundle (nor a temporary folder) is left.
// The working case (both peaks, the multipole table, A2 against Douglas and Konenkov 2002) is
// the README example's check in test/readme/readme.test.ts.
import { afterAll, describe, expect, it } from 'vitest';
import { readdirSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { iontrail, tempDir } from '../helpers/cli.js';

const tmp = tempDir('iontrail-beside-');
// The reversed range is found after the scene's own run, which solves its field: into a cache of ours.
const cache = tempDir('iontrail-beside-cache-');
process.env.XDG_CACHE_HOME = cache;
afterAll(() => { rmSync(tmp, { recursive: true, force: true }); rmSync(cache, { recursive: true, force: true }); });

const ROUND = 'scenes/qf4r-peak-scan.yaml', HYPER = 'scenes/qf4-peak-scan.yaml';

function refused(args: string[], message: RegExp) {
  const r = iontrail(['report', ROUND, ...args, '-o', join(tmp, 'bundle')]);
  expect(r.code, r.stderr).toBe(2);
  const lines = r.stderr.trim().split('\n').filter((l) => !l.startsWith('estimate:'));
  expect(lines).toHaveLength(1);
  expect(lines[0]).toMatch(message);
  expect(readdirSync(tmp)).toEqual([]);
}

describe('report --beside: bad input', () => {
  it('--beside without --vary, and --vary without --beside', () => {
    refused(['--beside', HYPER], /--beside OTHER\.yaml and --vary mz=A\.\.B:N go together/);
    refused(['--vary', 'mz=496..508:5'], /--beside OTHER\.yaml and --vary mz=A\.\.B:N go together/);
  });
  it('a --vary that is not m/z', () => {
    refused(['--beside', HYPER, '--vary', 'stages.0.dc=1V..2V:3'], /--vary with --beside varies m\/z .* got 'stages\.0\.dc=1V\.\.2V:3'/);
  });
  it('a scene beside that cannot be read names the file', () => {
    refused(['--beside', 'scenes/no-such-scene.yaml', '--vary', 'mz=496..508:5'], /scenes\/no-such-scene\.yaml: cannot read the scene file/);
  });
  it('a reversed m/z range names the key and the way to write it', () => {
    refused(['--beside', HYPER, '--vary', 'mz=508..496:5', '--set', 'ions.0.count=5', '--workers', '1'], /--vary mz: the range runs downward \(508\.\.496\).*mz=496\.\.508:5/);
  });
});
