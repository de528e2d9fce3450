// Run the built CLI (dist/, made by `npm test`'s tsc step) as a user would.

import { spawnSync, spawn, type ChildProcess } from 'node:child_process';
import { join, resolve, dirname } from 'node:path';
import { fileURLToPath } from 'node:url';

export const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '../..');
export const CLI = join(ROOT, 'cli/iontrail.js');

export function iontrail(args: string[], opts: { cwd?: string } = {}): { code: number; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [CLI, ...args], { cwd: opts.cwd ?? ROOT, encoding: 'utf8', maxBuffer: 64 << 20 });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

export function iontrailAsync(args: string[]): ChildProcess {
  return spawn(process.execPath, [CLI, ...args], { cwd: ROOT, stdio: ['ignore', 'pipe', 'pipe'] });
}

export { tempDir } from './temp.js';
