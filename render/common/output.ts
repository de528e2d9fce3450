// Figure files appear whole or not at all: encode in memory, write a temp file beside the target,
// rename (atomic on one filesystem, POSIX rename(2)); the temp file is removed on any failure.

import { existsSync, renameSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { randomBytes } from 'node:crypto';
import { basename, dirname, extname, join, resolve } from 'node:path';

export class OutputError extends Error {
  override name = 'UsageError'; // printed as a one-line user error by the CLI (exit 2)
  readonly exitCode = 2;
}

export type ImageFormat = 'png' | 'svg';

/** Format from the file extension; a one-line error for anything else. */
export function imageFormat(path: string, allowed: readonly string[] = ['png', 'svg']): ImageFormat {
  const ext = extname(path).slice(1).toLowerCase();
  if (!allowed.includes(ext)) {
    throw new OutputError(`-o ${path}: unsupported file type '${ext || '(none)'}' (expected ${allowed.map((a) => '.' + a).join(' or ')})`);
  }
  return ext as ImageFormat;
}

export function checkOutputFolder(path: string): void {
  const dir = dirname(resolve(path));
  if (!existsSync(dir) || !statSync(dir).isDirectory()) {
    throw new OutputError(`-o ${path}: output folder ${dir} does not exist`);
  }
}

export function writeFileAtomic(path: string, data: string | Uint8Array): void {
  checkOutputFolder(path);
  const target = resolve(path);
  const tmp = join(dirname(target), `.${basename(target)}.${process.pid}-${randomBytes(4).toString('hex')}.tmp`);
  try {
    writeFileSync(tmp, data);
    renameSync(tmp, target);
  } catch (err) {
    rmSync(tmp, { force: true });
    throw err;
  }
}
