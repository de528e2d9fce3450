// An output folder the system will not create gives one line and exit 2, never a stack trace,
// and nothing is left behind (run, report, demo, sweep).
//
// Two ways to be refused, so that the check means something as root too (root ignores the
// permission bits, so chmod alone proves nothing there):
//  - a path under a regular file: ENOTDIR for every user;
//  - a read-only parent (chmod 555) for an ordinary user; as root, detected by a probe write that
//    succeeds, a folder name longer than NAME_MAX (255 bytes on Linux, POSIX <limits.h>) instead,
//    which mkdir refuses (ENAMETOOLONG) for root as well.

import { afterAll, describe, expect, it } from 'vitest';
import { chmodSync, mkdirSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { iontrail, tempDir } from '../helpers/cli.js';

const dirs: string[] = [];
const temp = () => { const d = tempDir('iontrail-outdir-'); dirs.push(d); return d; };
afterAll(() => {
  for (const d of dirs) { chmodAll(d); rmSync(d, { recursive: true, force: true }); }
});
function chmodAll(d: string) {
  try { chmodSync(d, 0o755); for (const f of readdirSync(d)) chmodAll(join(d, f)); } catch { /* a file */ }
}

const SCENE = `
name: Skerry LT-1 output folder check
stages:
  - type: source
    extraction: { length: 5 mm, voltage: 300 V }
    acceleration: { length: 10 mm, voltage: 2700 V }
  - type: drift
    length: 500 mm
ions:
  - { mz: 100, count: 5, position: { z: 2.5 mm, spread_z: 0.05 mm }, energy: 0.02 eV }
run: { max_time: 100 us, record_every: 0 }
`;

/** A folder whose children cannot be created, and how (chmod, or a name too long for root). */
function refusingTarget(): { target: string; how: string } {
  const d = temp();
  const ro = join(d, 'ro');
  mkdirSync(ro);
  chmodSync(ro, 0o555);
  let writable = false;
  try { writeFileSync(join(ro, 'probe'), ''); writable = true; rmSync(join(ro, 'probe')); } catch { /* refused: good */ }
  if (!writable) return { target: join(ro, 'out'), how: 'EACCES' };
  chmodSync(ro, 0o755);
  return { target: join(ro, 'x'.repeat(300)), how: 'ENAMETOOLONG' };
}

function expectOneLine(r: { code: number; stderr: string }, re: RegExp) {
  expect(r.code, r.stderr).toBe(2);
  const lines = r.stderr.trim().split('\n').filter((l) => !l.startsWith('estimate:'));
  expect(lines, r.stderr).toHaveLength(1);
  expect(lines[0]).toMatch(re);
  expect(r.stderr).not.toMatch(/\n\s+at /); // no stack trace
}

describe('an output folder that cannot be created', () => {
  const scenes = () => { const d = temp(); writeFileSync(join(d, 's.yaml'), SCENE); return join(d, 's.yaml'); };

  for (const cmd of ['run', 'report'] as const) {
    it(`${cmd}: under a regular file`, () => {
      const d = temp();
      writeFileSync(join(d, 'file'), 'x');
      const r = iontrail([cmd, scenes(), '-o', join(d, 'file', 'out')]);
      expectOneLine(r, new RegExp(`^iontrail ${cmd}: .*file is a file, not a folder$`));
      expect(readdirSync(d)).toEqual(['file']);
    });

    it(`${cmd}: in a folder the system refuses`, () => {
      const { target, how } = refusingTarget();
      const r = iontrail([cmd, scenes(), '-o', target]);
      expectOneLine(r, new RegExp(`^iontrail ${cmd}: .*cannot create the output folder in .* \\(${how}: `));
      chmodAll(join(target, '..'));
      expect(readdirSync(join(target, '..'))).toEqual([]);
    });
  }

  it('demo: under a regular file and in a refusing folder', () => {
    const d = temp();
    writeFileSync(join(d, 'file'), 'x');
    expectOneLine(iontrail(['demo', '-o', join(d, 'file', 'demo')]), /^iontrail demo: -o .*: cannot create the folder \(ENOTDIR: /);
    const { target, how } = refusingTarget();
    expectOneLine(iontrail(['demo', '-o', target]), new RegExp(`^iontrail demo: -o .*: cannot create the folder \\(${how}: `));
  });

  it('sweep: in a folder the system refuses', () => {
    const { target, how } = refusingTarget();
    const r = iontrail(['sweep', scenes(), '--vary', 'mz=100..101:2', '-o', target]);
    expectOneLine(r, new RegExp(`^iontrail sweep: .*\\(${how}: `));
  });
});
