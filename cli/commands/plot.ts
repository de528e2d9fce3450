// iontrail plot RUN_DIR --kind KIND -o FILE.png|.svg [kind flags]: one 2D figure of a run folder.

import { parseArgs, requireFlag, flag } from '../args.js';
import { UsageError } from '../errors.js';
import { KINDS, kindByName, plotRun } from '../../render/plot/index.js';
import { closest } from '../args.js';
import { plotSweep } from '../../render/plot/sweep-figure.js';

export const describe = 'draw a 2D figure (traces, stability, phase, xy, cooling, arrival, energy) of a run folder';

const COMMON_VALUES = ['kind', 'out', 'width', 'height'];

function help(): string {
  const lines = [
    'usage: iontrail plot RUN_DIR --kind KIND -o FILE.png|FILE.svg [--width PX] [--height PX] [kind options]',
    '',
    'kinds:',
  ];
  for (const k of KINDS) {
    lines.push(`  ${k.name.padEnd(10)} ${k.describe}`);
    for (const [f, h] of Object.entries(k.flags)) lines.push(`      --${f.padEnd(10)} ${h}`);
    for (const [f, h] of Object.entries(k.switches ?? {})) lines.push(`      --${f.padEnd(10)} ${h}`);
  }
  lines.push('  sweep      columns of a sweep folder (iontrail sweep) against the first varied key;');
  lines.push('             several folders of one-key sweeps of the same key: one curve per folder');
  lines.push('      --y         columns of sweep.csv, comma separated (default transmission)');
  lines.push('      --x         column for the horizontal axis (default the first varied key)');
  return lines.join('\n') + '\n';
}

function pixels(text: string | undefined, name: string): number | undefined {
  if (text === undefined) return undefined;
  const v = Number(text.replace(/\s*px$/, ''));
  if (!Number.isInteger(v) || v < 200 || v > 8000) throw new UsageError(`plot: --${name} expects a size in pixels from 200 to 8000, got '${text}'`);
  return v;
}

/** --kind sweep: columns of a sweep folder's sweep.csv against the first varied key. */
async function plotSweepFolder(argv: string[]): Promise<number> {
  const args = parseArgs(argv, { values: [...COMMON_VALUES, 'y', 'x'], aliases: { o: 'out' } }, 'plot');
  if (args.positional.length < 1) throw new UsageError('plot: expected a SWEEP_DIR (several one-key sweeps of the same key draw one curve each)');
  const out = requireFlag(args, 'out', 'plot', 'figure.png');
  const ys = (flag(args, 'y') ?? 'transmission').split(',').map((s) => s.trim()).filter((s) => s !== '');
  const r = await plotSweep(args.positional, out, ys, flag(args, 'x'), pixels(flag(args, 'width'), 'width'), pixels(flag(args, 'height'), 'height'));
  process.stderr.write(`plot: wrote ${out} (${r.bytes} bytes)\n`);
  return 0;
}

export async function run(argv: string[]): Promise<number> {
  if (argv.includes('--help') || argv.includes('-h')) {
    process.stdout.write(help());
    return 0;
  }
  // First pass finds the kind, so its own flags can be accepted and others refused by name.
  const kindIdx = argv.findIndex((a) => a === '--kind' || a.startsWith('--kind='));
  const kindName = kindIdx < 0 ? undefined : argv[kindIdx].startsWith('--kind=') ? argv[kindIdx].slice(7) : argv[kindIdx + 1];
  if (kindName === undefined) throw new UsageError(`plot: missing --kind (one of ${KINDS.map((k) => k.name).join(', ')}, sweep)`);
  if (kindName === 'sweep') return plotSweepFolder(argv);
  const kind = kindByName(kindName);
  if (!kind) {
    const hint = closest(kindName, KINDS.map((k) => k.name));
    throw new UsageError(`plot: unknown --kind '${kindName}'${hint ? ` (did you mean '${hint}'?)` : ''}; expected one of ${KINDS.map((k) => k.name).join(', ')}`);
  }
  const args = parseArgs(argv, {
    values: [...COMMON_VALUES, ...Object.keys(kind.flags)],
    switches: Object.keys(kind.switches ?? {}),
    aliases: { o: 'out' },
  }, 'plot');
  if (args.positional.length !== 1) {
    throw new UsageError(`plot: expected one RUN_DIR, got ${args.positional.length === 0 ? 'none' : args.positional.join(' ')}`);
  }
  const out = requireFlag(args, 'out', 'plot', 'figure.png');
  const values = new Map<string, string>();
  for (const f of Object.keys(kind.flags)) {
    const v = flag(args, f);
    if (v !== undefined) values.set(f, v);
  }
  const result = await plotRun(args.positional[0], {
    kind: kind.name, out,
    width: pixels(flag(args, 'width'), 'width'),
    height: pixels(flag(args, 'height'), 'height'),
    values, switches: args.switches,
  });
  process.stderr.write(`plot: wrote ${out} (${result.bytes} bytes)\n`);
  return 0;
}
