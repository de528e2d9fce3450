// Shared by the shard tests: write N parts of a run or sweep through the CLI, merge them, and
// compare the merged folder with the unsharded one byte for byte.

import { expect } from 'vitest';
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { spawnSync } from 'node:child_process';
import { ROOT, iontrail } from '../helpers/cli.js';
import { formatSummary, type RunSummary } from '../../sim/runfolder/summary.js';
import { plotRun } from '../../render/plot/index.js';
import { plotSweep } from '../../render/plot/sweep-figure.js';

/** summary.json fields that a merge may change (wall times, the command and the parts), by folder kind. */
export const MERGE_FIELDS = {
  run: { stats: ['wall_s', 'ion_steps_per_s'], provenance: ['command_line', 'workers', 'started_at', 'shards'] },
  sweep: { stats: [], provenance: ['command_line', 'workers', 'started_at', 'wall_s', 'shards'] },
} as const;

/** A job script's command run by bash with the scheduler's variables set (SLURM_ARRAY_TASK_ID, ...). */
export function shell(script: string, env: Record<string, string>): void {
  const r = spawnSync('bash', ['-c', script], { cwd: ROOT, encoding: 'utf8', env: { ...process.env, ...env } });
  expect(r.status, r.stderr).toBe(0);
}

export function cli(args: string[]): string {
  const r = iontrail(args);
  expect(r.code, `iontrail ${args.join(' ')}\n${r.stderr}`).toBe(0);
  return r.stdout;
}

/** Parts 0..N−1 of `cmd` (run or sweep) with `args`, into dir/pN-I; their folders in order. */
export function writeParts(cmd: 'run' | 'sweep', args: string[], n: number, dir: string, workers: (i: number) => number): string[] {
  const parts: string[] = [];
  for (let i = 0; i < n; i++) {
    const p = join(dir, `p${n}-${i}`);
    cli([cmd, ...args, '--shard', `${i}/${n}`, '--workers', String(workers(i)), '-o', p]);
    parts.push(p);
  }
  return parts;
}

/**
 * Every file of the unsharded folder is in the merged one with the same bytes, except summary.json,
 * which is the same bytes once the MERGE_FIELDS of the merged summary take the unsharded values.
 */
export function expectSameFolder(full: string, merged: string, kind: 'run' | 'sweep'): void {
  const files = readdirSync(full).sort();
  expect(readdirSync(merged).sort()).toEqual(files);
  for (const f of files) {
    if (f === 'summary.json') continue;
    expect(readFileSync(join(merged, f)).equals(readFileSync(join(full, f))), `${f} byte-identical`).toBe(true);
  }
  const a = JSON.parse(readFileSync(join(full, 'summary.json'), 'utf8'));
  const b = JSON.parse(readFileSync(join(merged, 'summary.json'), 'utf8'));
  expect(b.provenance.shards, 'the merge lists its parts').toBeDefined();
  const f = MERGE_FIELDS[kind];
  for (const k of f.stats) b.stats[k] = a.stats[k];
  for (const k of f.provenance) {
    if (k in a.provenance) b.provenance[k] = a.provenance[k];
    else delete b.provenance[k];
  }
  // Re-written in each kind's own format: runs through formatSummary, sweeps as JSON with 2 spaces.
  const text = kind === 'run' ? formatSummary(b as RunSummary) : JSON.stringify(b, null, 2) + '\n';
  expect(text).toBe(readFileSync(join(full, 'summary.json'), 'utf8'));
}

/**
 * The figures of the merged folder are the unsharded folder's PNG bytes: `kinds` of `iontrail
 * plot` for a run, the sweep figure of `columns` for a sweep. Drawn into `into` (a temp folder).
 */
export async function expectSameFigures(full: string, merged: string, into: string, what: { kinds: string[] } | { columns: string[] }): Promise<void> {
  const draw = async (dir: string, name: string, tag: string) => {
    const out = join(into, `${tag}-${name}.png`);
    if ('kinds' in what) await plotRun(dir, { kind: name, out });
    else await plotSweep(dir, out, name.split('+'));
    return readFileSync(out);
  };
  const names = 'kinds' in what ? what.kinds : [what.columns.join('+')];
  for (const name of names) {
    const a = await draw(full, name, 'full'), b = await draw(merged, name, 'merged');
    expect(a.byteLength, `${name} figure drawn`).toBeGreaterThan(1000);
    expect(b.equals(a), `${name} figure byte-identical`).toBe(true);
  }
}
