// `iontrail render` end to end from the built CLI (npm test builds dist/ first): every format
// writes a whole file, and bad input exits 2 with one line and leaves no file behind.
import { spawnSync } from 'node:child_process';
import { copyFileSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, truncateSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeRunFolder } from './fixtures.js';

const CLI = resolve('cli/iontrail.js');
let tmp: string;
let runDir: string;

const iontrail = (...args: string[]) => spawnSync(process.execPath, [CLI, ...args], { encoding: 'utf8' });

beforeAll(async () => {
  tmp = mkdtempSync(join(tmpdir(), 'iontrail-render-cli-'));
  runDir = await makeRunFolder(join(tmp, 'run'), { kind: 'filter', ions: 12, points: 100 });
});
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

describe('iontrail render', () => {
  it('writes .png, .glb and .html, reporting what it wrote with --json', () => {
    for (const [file, magic] of [['a.png', '\x89PNG'], ['a.glb', 'glTF'], ['a.html', '<!doctype html>']] as const) {
      const out = join(tmp, file);
      const r = iontrail('render', runDir, '-o', out, '--json', '--size', '640x400', '--color', 'fate');
      expect(r.status, r.stderr).toBe(0);
      const info = JSON.parse(r.stdout);
      expect(info.ions).toBe(12);
      expect(info.bytes).toBe(statSync(out).size);
      expect(readFileSync(out, 'latin1').startsWith(magic)).toBe(true);
    }
  }, 60_000);

  const bad: [string, () => string[], RegExp][] = [
    ['not a run folder', () => ['render', tmp, '-o', join(tmp, 'x.png')], /not a run folder/],
    ['unknown camera', () => ['render', runDir, '-o', join(tmp, 'x.png'), '--camera', 'topdown'], /unknown camera 'topdown'.*iso\|axial\|side/],
    ['missing output folder', () => ['render', runDir, '-o', join(tmp, 'nowhere', 'x.png')], /output folder does not exist/],
    ['unknown extension', () => ['render', runDir, '-o', join(tmp, 'x.jpg')], /unknown extension '\.jpg'.*\.png, \.glb or \.html/],
    ['bad --color', () => ['render', runDir, '-o', join(tmp, 'x.png'), '--color', 'speed'], /--color 'speed' is not one of time\|energy\|mz\|fate/],
  ];
  for (const [what, args, message] of bad) {
    it(`${what}: one-line error, exit 2, no output`, () => {
      const r = iontrail(...args());
      expect(r.status).toBe(2);
      expect(r.stderr.trim().split('\n')).toHaveLength(1);
      expect(r.stderr).toMatch(message);
      expect(readdirSync(tmp).filter((f) => f.startsWith('x.') || f.includes('.tmp'))).toEqual([]);
    });
  }

  it('a truncated trajectories.arrow: one-line error, exit 2, no output and no temp file', () => {
    const broken = join(tmp, 'broken');
    mkdirSync(broken);
    for (const f of readdirSync(runDir)) copyFileSync(join(runDir, f), join(broken, f));
    const p = join(broken, 'trajectories.arrow');
    truncateSync(p, Math.floor(statSync(p).size / 2));
    const out = join(tmp, 'y.png');
    const r = iontrail('render', broken, '-o', out);
    expect(r.status).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/trajectories\.arrow/);
    expect(readdirSync(tmp).filter((f) => f.startsWith('y.') || f.includes('.tmp'))).toEqual([]);
  });

  it('an existing output is replaced whole (atomic rename), not appended to', () => {
    const out = join(tmp, 'z.glb');
    writeFileSync(out, 'old contents that are longer than nothing');
    const r = iontrail('render', runDir, '-o', out);
    expect(r.status, r.stderr).toBe(0);
    expect(readFileSync(out, 'latin1').startsWith('glTF')).toBe(true);
  }, 60_000);
});
