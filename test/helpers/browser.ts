// Headless Chromium for the browser tests (Debian's package, driven by playwright-core). A test
// that needs it skips with a loud message where no browser can be had.

import { execFileSync } from 'node:child_process';
import { existsSync } from 'node:fs';

export function findChromium(): string | undefined {
  for (const name of ['chromium', 'chromium-browser']) {
    try {
      const p = execFileSync('which', [name], { encoding: 'utf8' }).trim();
      if (p && existsSync(p)) return p;
    } catch { /* not on PATH */ }
  }
  return undefined;
}

/** The chromium path, or undefined after printing why `what` is skipped. */
export function chromiumOrWarn(what: string): string | undefined {
  const exe = findChromium();
  if (!exe) {
    process.stderr.write('\n' + '!'.repeat(78) + `\n!!! SKIPPING ${what}: no chromium on PATH.\n` +
      '!!! Install it with: apt-get install -y chromium   (CI does this in .ci/run)\n' + '!'.repeat(78) + '\n\n');
  }
  return exe;
}
