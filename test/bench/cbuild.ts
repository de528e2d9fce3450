// Builds a benchmark's C reference kernel with the machine's cc -O2 into test/bench/.build/.

import { execFileSync } from 'node:child_process';
import { mkdirSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

/** The repository root, from either test/bench (sources) or dist/test/bench (compiled). */
export function repoRoot(): string {
  const here = dirname(fileURLToPath(import.meta.url));
  return here.includes('/dist/') ? resolve(here, '../../..') : resolve(here, '../..');
}

/** Compile test/bench/c/NAME.c; returns the executable path. */
export function buildC(name: string, extra: string[] = []): string {
  const root = repoRoot();
  const out = join(root, 'test/bench/.build');
  mkdirSync(out, { recursive: true });
  const exe = join(out, name);
  execFileSync('cc', ['-O2', '-o', exe, join(root, 'test/bench/c', `${name}.c`), '-lm', ...extra], { stdio: 'inherit' });
  return exe;
}

export function runC(exe: string, args: string[]): string {
  return execFileSync(exe, args, { encoding: 'utf8' }).trim();
}
