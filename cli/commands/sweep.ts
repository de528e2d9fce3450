// iontrail sweep SCENE --vary KEY=A..B:N [--vary KEY=A..B:N] -o DIR [--scan-lines A..B:N]
//   [--method auto|direct|matrix] [--seed N] [--workers N] [--set k=v]... [--force] [--json]

import { readFileSync } from 'node:fs';
import { parseArgs, flag } from '../args.js';
import { UsageError } from '../errors.js';
import { SceneError } from '../../sim/scene/schema.js';
import { runSweep, sweepSummary, type SweepMethod } from '../../sim/sweeps/sweep.js';
import { checkSweepFolder, writeSweepFolder } from '../../sim/sweeps/sweep-folder.js';
import { parseCount } from './run.js';
import { finiteOrNull } from '../../sim/core/json.js';

export const describe = 'transmission over m/z or any scene key (peak, FWHM, resolution; U/V scan lines)';

const USAGE = 'usage: iontrail sweep SCENE.yaml --vary KEY=A..B:N [--vary KEY=A..B:N] -o DIR [--scan-lines A..B:N] '
  + '[--method auto|direct|matrix] [--collect summary.path,...] [--seed N] [--workers N] [--set key=value]... [--force] [--json]';

/** How --vary ranges read (sim/sweeps/vary.ts); part of `sweep --help`. */
export const RANGE_NOTE = '  --vary KEY=A..B:N   N evenly spaced values from A to B inclusive, A below B (a reversed range such as mz=514..490:10 is refused; write mz=490..514:10)';

export async function run(argv: string[]): Promise<number> {
  const a = parseArgs(argv, {
    values: ['out', 'vary', 'seed', 'workers', 'set', 'method', 'scan-lines', 'collect'],
    switches: ['force', 'json', 'help'],
    repeatable: ['set', 'vary'],
    aliases: { o: 'out' },
  }, 'sweep');
  if (a.switches.has('help')) { process.stdout.write(USAGE + '\n\n' + RANGE_NOTE + '\n'); return 0; }
  if (a.positional.length !== 1) throw new UsageError(`sweep: give one scene file (${USAGE})`);
  const out = flag(a, 'out');
  if (!out) throw new UsageError('sweep: missing -o DIR (the folder for sweep.csv and summary.json)');
  const vary = a.values.get('vary') ?? [];
  if (vary.length === 0) throw new UsageError('sweep: missing --vary (for example --vary mz=480..520:201)');
  if (vary.length > 2) throw new UsageError(`sweep: at most two --vary (got ${vary.length})`);
  const method = (flag(a, 'method') ?? 'auto') as SweepMethod;
  if (!['auto', 'direct', 'matrix'].includes(method)) throw new UsageError(`sweep: --method expects auto, direct or matrix, got '${method}'`);
  const seed = parseCount(flag(a, 'seed'), '--seed', 0);
  const workers = parseCount(flag(a, 'workers'), '--workers', 1);
  const force = a.switches.has('force');
  const file = a.positional[0];
  let text: string;
  try {
    text = readFileSync(file, 'utf8');
  } catch (e) {
    throw new SceneError(`${file}: cannot read the scene file (${(e as NodeJS.ErrnoException).code ?? 'error'})`);
  }
  checkSweepFolder(out, force);
  const tty = process.stderr.isTTY === true;
  let last = 0;
  const commandLine = ['iontrail', 'sweep', ...argv].join(' ');
  const result = await runSweep({
    sceneText: text, sceneFile: file, set: a.values.get('set') ?? [], seed, vary,
    collect: (a.values.get('collect')?.[0] ?? '').split(',').map((x) => x.trim()).filter((x) => x !== ''),
    scanLines: flag(a, 'scan-lines'), method, workers,
    progress: (done, total) => {
      if (!tty) return;
      const now = performance.now();
      if (now - last < 200 && done < total) return;
      last = now;
      process.stderr.write(`\rsweep ${done}/${total} points   `);
    },
  });
  if (tty) process.stderr.write('\n');
  writeSweepFolder(out, result, { force, commandLine });
  for (const w of result.warnings) process.stderr.write(`warning: ${w}\n`);
  if (a.switches.has('json')) {
    process.stdout.write(JSON.stringify(sweepSummary(result, { commandLine }), finiteOrNull) + '\n');
    return 0;
  }
  const f = (v: number | null | undefined, d = 4) => (v === null || v === undefined ? 'n/a' : Number(v.toPrecision(d)).toString());
  const lines = [
    result.scene.name,
    `  sweep folder  ${out}`,
    `  ${result.points.length} points × ${ionCount(result.points.map((p) => p.total))} ions, method ${result.method.used}${result.method.direct_because ? ` (direct: ${result.method.direct_because})` : ''}, ${result.wallSeconds.toFixed(2)} s`,
  ];
  const p = result.peak;
  if (p) {
    lines.push(`  peak m/z ${f(p.mz, 6)}  FWHM ${f(p.fwhm_mz)}  R50 ${f(p.resolution_50)}  R10 ${f(p.resolution_10)}  transmission ${(100 * p.transmission).toFixed(1)} %`);
  }
  for (const row of result.peaks ?? []) {
    const q = row.peak;
    lines.push(`  ${row.key} = ${row.value}: ${q ? `peak m/z ${f(q.mz, 6)}  R50 ${f(q.resolution_50)}  transmission ${(100 * q.transmission).toFixed(1)} %` : 'nothing transmitted'}`);
  }
  for (const l of result.scanLines?.lines ?? []) {
    const q = l.peak;
    lines.push(`  U/V ${l.u_over_v}: ${q ? `R50 ${f(q.resolution_50)}  R10 ${f(q.resolution_10)}  transmission ${(100 * q.transmission).toFixed(1)} %` : 'nothing transmitted'}  (Mathieu window R ${f(l.mathieu_window?.resolution ?? null)})`);
  }
  process.stdout.write(lines.join('\n') + '\n');
  return 0;
}

/** "2000", or "40–120" when the varied keys change the number of ions per point. */
function ionCount(totals: number[]): string {
  const lo = Math.min(...totals), hi = Math.max(...totals);
  return lo === hi ? String(lo) : `${lo}–${hi}`;
}
