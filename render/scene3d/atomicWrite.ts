// Outputs appear whole or not at all: write a temp file beside the target, then rename (atomic on
// one filesystem, POSIX rename(2)). A failure removes the temp file so no partial output is left.

import { existsSync, renameSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';
import { RenderError } from './errors.js';

/** Throws a one-line RenderError when the folder that should hold `path` does not exist. */
export function checkOutputFolder(path: string): void {
  const dir = dirname(resolve(path));
  if (!existsSync(dir) || !statSync(dir).isDirectory()) {
    throw new RenderError(`output folder does not exist: ${dir} (for -o ${path})`);
  }
}

export function writeFileAtomic(path: string, data: string | Uint8Array): void {
  checkOutputFolder(path);
  const target = resolve(path);
  const tmp = join(dirname(target), `.${basename(target)}.${process.pid}.${Date.now()}.tmp`);
  try {
    writeFileSync(tmp, data);
    renameSync(tmp, target);
  } catch (err) {
    rmSync(tmp, { force: true });
    throw err;
  }
}
