// Outputs appear whole or not at all: write a temp file beside the target, then rename (atomic on
// one filesystem, POSIX rename(2)). A failure removes the temp file so no partial output is left.

import { existsSync, statSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { writeFileAtomic as commonWriteFileAtomic } from '../common/output.js';
import { RenderError } from './errors.js';

/** Throws a one-line RenderError when the folder that should hold `path` does not exist. */
export function checkOutputFolder(path: string): void {
  const dir = dirname(resolve(path));
  if (!existsSync(dir) || !statSync(dir).isDirectory()) {
    throw new RenderError(`output folder does not exist: ${dir} (for -o ${path})`);
  }
}

/** Atomic write (render/common/output.ts), after this module's own folder check and message. */
export function writeFileAtomic(path: string, data: string | Uint8Array): void {
  checkOutputFolder(path);
  commonWriteFileAtomic(path, data);
}
