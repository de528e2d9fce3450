// The sweep's output folder, written atomically: every file goes into a temp folder beside DIR,
// which is renamed into place at the end, so DIR is absent, the old folder, or a complete new one.

import { existsSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { folderBeside, swapFolderIntoPlace } from '../core/atomic.js';
import { finiteOrNull } from '../core/json.js';
import { SweepError } from './vary.js';
import { scanLinePointsCsv, scanLinesCsv, sweepCsv, sweepSummary, SWEEP_FILES, type SweepResult } from './sweep.js';

/** Refuse a DIR that cannot be written (missing parent; existing without force) before any work. */
export function checkSweepFolder(dir: string, force: boolean): void {
  const target = resolve(dir);
  const parent = dirname(target);
  if (!existsSync(parent) || !statSync(parent).isDirectory()) throw new SweepError(`${dir}: parent folder ${parent} does not exist`);
  if (existsSync(target) && !force) throw new SweepError(`${dir}: already exists (give --force to replace it)`);
}

export function writeSweepFolder(dir: string, r: SweepResult, opts: { force?: boolean; commandLine?: string; provenance?: Record<string, unknown> } = {}): void {
  checkSweepFolder(dir, opts.force ?? false);
  const target = resolve(dir);
  const temp = folderBeside(target);
  try {
    writeFileSync(join(temp, SWEEP_FILES.csv), sweepCsv(r));
    const lines = scanLinesCsv(r), pts = scanLinePointsCsv(r);
    if (lines !== null) writeFileSync(join(temp, SWEEP_FILES.scanLines), lines);
    if (pts !== null) writeFileSync(join(temp, SWEEP_FILES.scanLinePoints), pts);
    writeFileSync(join(temp, SWEEP_FILES.summary), JSON.stringify(sweepSummary(r, { commandLine: opts.commandLine, provenance: opts.provenance }), finiteOrNull, 2) + '\n');
    swapFolderIntoPlace(temp, target, true); // an existing DIR was allowed (force) by checkSweepFolder
  } catch (e) {
    rmSync(temp, { recursive: true, force: true });
    if (e instanceof SweepError) throw e;
    throw new SweepError(`${dir}: could not write the sweep folder (${(e as Error).message.split('\n')[0]})`);
  }
}
