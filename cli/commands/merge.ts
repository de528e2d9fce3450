// iontrail merge PART_DIR... -o DIR [--force] [--csv] [--json]

import { existsSync } from 'node:fs';
import { parseArgs, flag, type FlagSpec } from '../args.js';
import { UsageError } from '../errors.js';
import { orderParts } from '../../sim/runs/shard.js';
import { mergeRun } from '../../sim/runs/merge-run.js';
import { mergeSweep } from '../../sim/sweeps/shard-sweep.js';
import { checkSweepFolder } from '../../sim/sweeps/sweep-folder.js';
import { TOOL_VERSION } from '../../sim/version.js';
import { finiteOrNull } from '../../sim/core/json.js';

export const describe = 'join the part folders of a sharded run or sweep into the folder one machine would write';

const USAGE = 'usage: iontrail merge PART_DIR... -o DIR [--force] [--csv] [--json]';

const HELP = `${USAGE}

Joins the N part folders written by \`iontrail run|sweep ... --shard I/N\` into DIR, byte for byte the
folder an unsharded run or sweep writes (ions.arrow, trajectories.arrow, history.arrow,
history_species.arrow, sweep.csv and the figures of summary.json). summary.json differs only in
stats.wall_s, stats.ion_steps_per_s (runs), provenance.command_line, workers, started_at and wall_s
(sweeps), and in provenance.shards, which lists the parts, their slices and wall times.
The parts must be of one scene (same resolved-scene hash), seed and tool version, each shard once,
none missing; the merge streams them one record batch at a time.

  -o, --out DIR   folder to write; its parent must exist
  --force         replace an existing DIR (the old one is removed only once the new one is complete)
  --csv           also write the CSV copies of the tables (runs)
  --json          print summary.json to stdout instead of the short table
  -h, --help      this text
`;

export const FLAGS: FlagSpec = {
  values: ['out'],
  switches: ['force', 'csv', 'json', 'help'],
  aliases: { o: 'out', h: 'help' },
};

export async function run(argv: string[]): Promise<number> {
  const a = parseArgs(argv, FLAGS, 'merge');
  if (a.switches.has('help')) { process.stdout.write(HELP); return 0; }
  const out = flag(a, 'out');
  if (!out) throw new UsageError('merge: missing -o DIR (the folder to write)');
  if (a.positional.length === 0) throw new UsageError(`merge: give the part folders (${USAGE})`);
  const force = a.switches.has('force');
  // Refused before any part is read: nothing is written.
  checkSweepFolder(out, force);
  const parts = orderParts(a.positional, TOOL_VERSION);
  const commandLine = ['iontrail', 'merge', ...argv].join(' ');
  let summary: Record<string, unknown>;
  let line: string;
  if (parts[0].m.kind === 'run') {
    const s = await mergeRun(parts, { out, force, csv: a.switches.has('csv'), commandLine });
    summary = s;
    line = `${s.ions.total} ions (${s.ions.detected} detected)`;
  } else {
    if (a.switches.has('csv')) throw new UsageError('merge: --csv applies to runs; a sweep folder holds CSV already');
    const s = mergeSweep(parts, { out, force, commandLine });
    summary = s;
    line = `${(s.sweep as { points: number }).points} points`;
  }
  if (a.switches.has('json')) process.stdout.write(JSON.stringify(summary, finiteOrNull) + '\n');
  else process.stdout.write(`${String(summary.scene_name)}\n  merged ${parts.length} parts into ${out}: ${line}${existsSync(out) ? '' : ' (not written)'}\n`);
  return 0;
}
