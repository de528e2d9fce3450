// Outputs appear whole or not at all (sim/core/atomic.ts), after this module's own one-line check
// of the output folder.

import { existsSync, statSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { writeFileAtomic as writeAtomic } from '../../sim/core/atomic.js';
import { RenderError } from './errors.js';

/** Throws a one-line RenderError when the folder that should hold `path` does not exist. */
export function checkOutputFolder(path: string): void {
  const dir = dirname(resolve(path));
  if (!existsSync(dir) || !statSync(dir).isDirectory()) {
    throw new RenderError(`output folder does not exist: ${dir} (for -o ${path})`);
  }
}

/** Atomic write, after this module's own folder check and message. */
export function writeFileAtomic(path: string, data: string | Uint8Array): void {
  checkOutputFolder(path);
  writeAtomic(path, data);
}
