// Outputs appear whole or not at all. A file is written beside its target and renamed over it; a
// folder is built beside its target and renamed into place, the old folder moving out only then.
// rename(2) is atomic within one filesystem, which "beside" guarantees.

import { existsSync, mkdirSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import { randomBytes } from 'node:crypto';
import { basename, dirname, join, resolve } from 'node:path';

/** pid and a random tag: two runs writing the same target never share a temp name. */
function stamp(): string {
  return `${process.pid}-${randomBytes(4).toString('hex')}`;
}

/** Write `data` to `path` through a hidden temp file beside it; the temp file goes on any failure. */
export function writeFileAtomic(path: string, data: string | Uint8Array): void {
  const target = resolve(path);
  const tmp = join(dirname(target), `.${basename(target)}.${stamp()}.tmp`);
  try {
    writeFileSync(tmp, data);
    renameSync(tmp, target);
  } catch (err) {
    rmSync(tmp, { force: true });
    throw err;
  }
}

/** An output that the system refuses (read-only folder, name too long, disk full): one line, exit 2. */
export class OutputError extends Error {
  override name = 'OutputError';
  readonly exitCode = 2;
}

/** "EACCES: permission denied" from a system error, without the call and path Node appends. */
export function systemReason(err: unknown): string {
  const e = err as NodeJS.ErrnoException;
  const text = (e?.message ?? String(err)).split('\n')[0];
  return e?.code ? `${e.code}: ${text.replace(/^[A-Z]+: /, '').replace(/, \w+ '.*$/, '')}` : text;
}

/** A new empty folder beside `target` (its parent must exist) in which to build target's contents. */
export function folderBeside(target: string): string {
  const t = resolve(target);
  const temp = join(dirname(t), `${basename(t)}.partial-${stamp()}`);
  try {
    mkdirSync(temp);
  } catch (err) {
    throw new OutputError(`${target}: cannot create the output folder in ${dirname(t)} (${systemReason(err)})`);
  }
  return temp;
}

/**
 * Moves the complete folder `temp` (from folderBeside) to `target`. An existing target is replaced
 * only when `replace` (false is returned otherwise, nothing moved); the old folder is moved aside
 * first, put back if the second rename fails, and removed once the new one is in place. The
 * caller removes `temp` when this throws.
 */
export function swapFolderIntoPlace(temp: string, target: string, replace: boolean): boolean {
  if (!existsSync(target)) {
    renameSync(temp, target);
    return true;
  }
  if (!replace) return false;
  const old = `${temp}.old`;
  renameSync(target, old);
  try {
    renameSync(temp, target);
  } catch (err) {
    renameSync(old, target);
    throw err;
  }
  rmSync(old, { recursive: true, force: true });
  return true;
}
