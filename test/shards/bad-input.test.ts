// Bad input to --shard and `iontrail merge` (issue 16, "Bad input"): one clear line, exit 2, and
// nothing written — no merged folder and no temporary folder left beside it.

import { beforeAll, describe, expect, it } from 'vitest';
import { cpSync, existsSync, mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { iontrail, tempDir } from '../helpers/cli.js';
import { cli } from './compare.js';
import { filterScene } from './scenes.js';

const SCENE = filterScene({ name: 'Skerry QF-4 bad-input check', seed: 3, count: 40 });

const d = tempDir();
const scene = join(d, 'scene.yaml');
const part = (i: number) => join(d, `part-${i}`);

beforeAll(() => {
  writeFileSync(scene, SCENE);
  for (let i = 0; i < 3; i++) cli(['run', scene, '--shard', `${i}/3`, '--workers', '1', '-o', part(i)]);
  // A part of another scene (another DC) and a part of the same scene at another tool version.
  cli(['run', scene, '--set', 'stages.0.dc=91V', '--shard', '1/3', '--workers', '1', '-o', join(d, 'other-1')]);
  cpSync(part(1), join(d, 'old-1'), { recursive: true });
  editManifest(join(d, 'old-1'), (m) => { m.tool_version = '0.0.1'; });
  cpSync(part(2), join(d, 'cut-2'), { recursive: true });
  editManifest(join(d, 'cut-2'), (m) => { m.complete = false; });
}, 60_000);

function editManifest(dir: string, edit: (m: Record<string, unknown>) => void): void {
  const f = join(dir, 'shard.json');
  const m = JSON.parse(readFileSync(f, 'utf8'));
  edit(m);
  writeFileSync(f, JSON.stringify(m));
}

/** Exit 2, one stderr line matching `msg`, and the output folder's parent unchanged. */
function refused(args: string[], msg: RegExp, out: string): void {
  const parent = join(out, '..');
  const before = readdirSync(parent).sort();
  const r = iontrail(args);
  expect(r.code, r.stderr).toBe(2);
  const lines = r.stderr.trim().split('\n');
  expect(lines, r.stderr).toHaveLength(1);
  expect(lines[0]).toMatch(msg);
  expect(readdirSync(parent).sort(), 'nothing written beside the output').toEqual(before);
}

describe('--shard and merge refuse bad input', () => {
  it('a shard index out of range, or not I/N', () => {
    const out = join(d, 'x');
    refused(['run', scene, '--shard', '3/3', '-o', out], /--shard 3\/3: the index runs from 0 to 2 \(0-based\)/, out);
    refused(['run', scene, '--shard', '1of3', '-o', out], /--shard expects I\/N/, out);
    refused(['sweep', scene, '--vary', 'mz=500..504:3', '--shard', '5/2', '-o', out], /--shard 5\/2: the index runs from 0 to 1/, out);
  });

  it('parts of different scenes', () => {
    const out = join(d, 'm');
    refused(['merge', part(0), join(d, 'other-1'), part(2), '-o', out], /other-1: scene hash \w+ differs from .*part-0 .*not of one job/, out);
  });

  it('parts of different tool versions, or of another version than this one', () => {
    const out = join(d, 'm');
    refused(['merge', part(0), join(d, 'old-1'), part(2), '-o', out], /old-1: tool version 0\.0\.1 differs from/, out);
    const old = [0, 1, 2].map((i) => { const p = join(d, `all-old-${i}`); cpSync(part(i), p, { recursive: true }); editManifest(p, (m) => { m.tool_version = '0.0.1'; }); return p; });
    refused(['merge', ...old, '-o', out], /written by iontrail 0\.0\.1, this is \S+; merge with the version that wrote the parts/, out);
  });

  it('a missing slice, a doubled slice, an incomplete part, a folder that is no part', () => {
    const out = join(d, 'm');
    refused(['merge', part(0), part(2), '-o', out], /shard 1\/3 missing \(have 0, 2 of 0\.\.2\)/, out);
    refused(['merge', part(0), part(1), part(1), part(2), '-o', out], /shard 1\/3 given twice \(.*part-1 and .*part-1\)/, out);
    refused(['merge', part(0), part(1), join(d, 'cut-2'), '-o', out], /cut-2: shard 2\/3 is incomplete/, out);
    refused(['merge', part(0), part(1), d, '-o', out], /not a shard part \(no shard\.json/, out);
  });

  it('a merge into an existing folder without --force; with --force it is replaced', () => {
    const out = join(d, 'existing');
    mkdirSync(out);
    writeFileSync(join(out, 'keep.txt'), 'old');
    refused(['merge', part(0), part(1), part(2), '-o', out], /existing: already exists \(give --force to replace it\)/, out);
    expect(readFileSync(join(out, 'keep.txt'), 'utf8')).toBe('old');
    cli(['merge', part(0), part(1), part(2), '-o', out, '--force']);
    expect(existsSync(join(out, 'keep.txt'))).toBe(false);
    expect(JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8')).ions.total).toBe(40);
  });
});
