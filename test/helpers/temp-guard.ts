// vitest globalSetup: the suite runs with a temp dir of its own (TMPDIR, which os.tmpdir() and
// every CLI child read), so what the tests leave there is theirs alone, not that of another suite
// running on the same machine. At the end, any iontrail-* entry left fails the run.

import { mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

export default function setup(): () => void {
  const outer = tmpdir();
  const own = mkdtempSync(join(outer, 'iontrail-suite-'));
  const before = process.env.TMPDIR;
  process.env.TMPDIR = own;
  return () => {
    if (before === undefined) delete process.env.TMPDIR; else process.env.TMPDIR = before;
    const left = readdirSync(own);
    rmSync(own, { recursive: true, force: true });
    const ours = left.filter((f) => f.startsWith('iontrail-'));
    const other = left.filter((f) => !f.startsWith('iontrail-'));
    if (other.length > 0) process.stderr.write(`note: the tests left ${other.length} other temp entries (${other.slice(0, 5).join(', ')}); removed\n`);
    if (ours.length > 0) {
      process.exitCode = 1;
      throw new Error(`the tests left ${ours.length} iontrail-* folders in the temp dir (${ours.slice(0, 8).join(', ')}${ours.length > 8 ? ', ...' : ''}); make them with tempDir() from test/helpers/temp.ts or remove them`);
    }
  };
}
