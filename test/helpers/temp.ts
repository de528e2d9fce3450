// Temporary folders of the tests: every one made here is removed after its test file
// (test/helpers/temp-cleanup.ts, a vitest setup file), whatever the test did with it.

import { chmodSync, mkdtempSync, readdirSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

const made: string[] = [];

/** A new empty folder under the temp dir, removed after the test file. */
export function tempDir(prefix = 'iontrail-test-'): string {
  const d = mkdtempSync(join(tmpdir(), prefix));
  made.push(d);
  return d;
}

/** Remove every folder tempDir made (a test may have left one read-only: made writable first). */
export function removeTempDirs(): void {
  for (const d of made.splice(0)) {
    try {
      rmSync(d, { recursive: true, force: true });
    } catch {
      writable(d);
      rmSync(d, { recursive: true, force: true });
    }
  }
}

function writable(p: string): void {
  try {
    if (!statSync(p).isDirectory()) return;
    chmodSync(p, 0o700);
    for (const f of readdirSync(p)) writable(join(p, f));
  } catch { /* gone already */ }
}
