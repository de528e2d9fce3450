// iontrail sweep SCENE --vary KEY=A..B:N [--vary KEY=A..B:N] -o DIR [--scan-lines A..B:N]
//   [--method auto|direct|matrix] [--seed N] [--workers N] [--set k=v]... [--force] [--json]

import { readFileSync } from 'node:fs';
import { parseArgs, flag, type FlagSpec } from '../args.js';
import { UsageError } from '../errors.js';
import { SceneError } from '../../sim/scene/schema.js';
import type { Scene } from '../../sim/scene/types.js';
import { fieldProblemOf } from '../../sim/stages/registry.js';
import { cacheKey } from '../../sim/fields/cache.js';
import { DEFAULT_TOLERANCE } from '../../sim/fields/solve.js';
import { solvedFieldWarnings } from '../../sim/engine/solved-fields.js';
import { parseScene } from '../../sim/scene/load.js';
import { noSolveHelp, prepareTracking, refuseUntracked } from '../tracking.js';
import { planSweep, reduceFinished, runPointRange, sweepSummary, type SweepMethod } from '../../sim/sweeps/sweep.js';
import { onStopSignal } from '../../sim/runs/stop-signals.js';
import { aboutDuration, checkOutputLimit, estimateRun } from '../../sim/runs/estimate.js';
import { interruptedExitCode, maxOutputHelp, maxOutput, printEstimate } from '../run-limits.js';
import { checkSweepFolder, writeSweepFolder } from '../../sim/sweeps/sweep-folder.js';
import { parseCount } from './run.js';
import { finiteOrNull } from '../../sim/core/json.js';
import { parseShard, type ShardSpec } from '../../sim/runs/shard.js';
import { runSweepShard, sweepSlice } from '../../sim/sweeps/shard-sweep.js';
import type { SweepPlan } from '../../sim/sweeps/sweep.js';

export const describe = 'transmission over m/z or any scene key (peak, FWHM, resolution; U/V scan lines)';

const USAGE = 'usage: iontrail sweep SCENE.yaml --vary KEY=A..B:N [--vary KEY=A..B:N] -o DIR [--scan-lines A..B:N] '
  + '[--method auto|direct|matrix] [--collect summary.path,...] [--seed N] [--workers N] [--set key=value]... [--shard I/N] [--max-output SIZE] [--no-solve] [--force] [--json]';

const HELP = `${USAGE}

Runs the scene at every point of one or two varied keys and writes DIR:
  sweep.csv             one row per point: the varied keys, total, detected, transmission (and --collect columns)
  summary.json          peak m/z, FWHM, R50 and R10 of an m/z sweep, method, warnings and provenance
  scan-lines.csv        with --scan-lines: resolution and transmission per U/V line
  scan-line-points.csv  with --scan-lines: the transmission of every point of every line

  -o, --out DIR            sweep folder; its parent must exist
  --vary KEY=A..B:N        N evenly spaced values of KEY from A to B inclusive in the key's units, A below B
                           (a reversed range such as mz=514..490:10 is refused; write mz=490..514:10),
                           e.g. mz=480..520:201 or stages.0.dc=137V..138.5V:4; twice for a map (first key
                           outer); at most 100000 points in all
  --scan-lines A..B:N      N U/V ratios of the first quadrupole (needs one --vary mz): resolution against
                           transmission along each scan line
  --method M               auto (transfer matrix where the scene is linear, else integration), direct or matrix
  --collect PATH,...       run every point in full and collect summary.json figures, e.g.
                           space_charge.frequency_shift_z,cooling.tau_s (columns after transmission)
  --seed N                 replace the scene's seed
  --workers N              worker threads for integrated points (default: all cores)
  --set key=value          override a scene value at every point, e.g. --set stages.0.dc=42V (repeatable)
  --shard I/N              run only slice I (0-based) of N of the points (point × ion ranges when N exceeds
                           the points) into a part folder; \`iontrail merge\` joins the parts into this sweep's bytes
${maxOutputHelp(27)}
                           (--collect writes each point's run folder to a temporary folder)
${noSolveHelp(27)}  --force                  replace an existing DIR (the old one is removed only once the new one is complete)
  --json                   print summary.json to stdout instead of the short table
  -h, --help               this text

Ctrl-C or SIGTERM stops the sweep after the point in progress: the points finished are written,
summary.json says "complete": false, and the exit code is 130 (SIGINT) or 143 (SIGTERM).
`;

/** The flags `iontrail sweep` accepts (the help text describes each). */
export const FLAGS: FlagSpec = {
  values: ['out', 'vary', 'seed', 'workers', 'set', 'method', 'scan-lines', 'collect', 'max-output', 'shard'],
  switches: ['force', 'json', 'help', 'no-solve'],
  repeatable: ['set', 'vary'],
  aliases: { o: 'out', h: 'help' },
};


export async function run(argv: string[]): Promise<number> {
  const a = parseArgs(argv, FLAGS, 'sweep');
  if (a.switches.has('help')) { process.stdout.write(HELP); return 0; }
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
  const limit = maxOutput(a);
  const file = a.positional[0];
  let text: string;
  try {
    text = readFileSync(file, 'utf8');
  } catch (e) {
    throw new SceneError(`${file}: cannot read the scene file (${(e as NodeJS.ErrnoException).code ?? 'error'})`);
  }
  refuseUntracked(file, parseScene(text, file, { set: a.values.get('set') ?? [] }).stages);
  // Solved fields first: the plan's checks (sceneWarnings) read them.
  await prepareTracking(file, parseScene(text, file, { set: a.values.get('set') ?? [] }), { noSolve: a.switches.has('no-solve'), workers });
  checkSweepFolder(out, force);
  const tty = process.stderr.isTTY === true;
  let last = 0;
  const commandLine = ['iontrail', 'sweep', ...argv].join(' ');
  let stoppedBy: string | null = null;
  const plan = planSweep({
    sceneText: text, sceneFile: file, set: a.values.get('set') ?? [], seed, vary,
    collect: (a.values.get('collect')?.[0] ?? '').split(',').map((x) => x.trim()).filter((x) => x !== ''),
    scanLines: flag(a, 'scan-lines'), method, workers, maxOutput: limit, stopped: () => stoppedBy !== null,
  });
  await prepareSweepFields(file, plan, { noSolve: a.switches.has('no-solve'), workers });
  const shardText = flag(a, 'shard');
  const shard = shardText === undefined ? undefined : parseShard(shardText);
  if (shard) sweepSlice(plan, shard);
  if (plan.collect.length > 0) {
    // Every point is a full run into a temporary run folder (removed after the point).
    const e = estimateRun({ ...plan.base, run: { ...plan.base.run, recordEvery: 0 } });
    checkOutputLimit(e, limit);
    printEstimate('per point: ')(e, plan.workers);
    process.stderr.write(`estimate: ${plan.tasks.length} points, ${aboutDuration((e.cpu_time_s / plan.workers) * plan.tasks.length)} in all\n`);
  }
  if (shard) return runShard(plan, shard, out, force, commandLine, a.switches.has('json'));
  const total = plan.tasks.length;
  let done = 0;
  const offSignals = onStopSignal((sig) => { stoppedBy = sig; });
  let points;
  try {
    points = await runPointRange(plan, 0, total, () => {
      done++;
      if (!tty) return;
      const now = performance.now();
      if (now - last < 200 && done < total) return;
      last = now;
      process.stderr.write(`\rsweep ${done}/${total} points   `);
    });
  } finally {
    offSignals();
  }
  if (tty) process.stderr.write('\n');
  const result = reduceFinished(plan, points, stoppedBy ?? 'a stop request');
  writeSweepFolder(out, result, { force, commandLine });
  for (const w of result.warnings) process.stderr.write(`warning: ${w}\n`);
  const code = result.complete ? 0 : interruptedExitCode();
  if (a.switches.has('json')) {
    process.stdout.write(JSON.stringify(sweepSummary(result, { commandLine }), finiteOrNull) + '\n');
    return code;
  }
  const f = (v: number | null | undefined, d = 4) => (v === null || v === undefined ? 'n/a' : Number(v.toPrecision(d)).toString());
  const lines = [
    result.scene.name,
    `  sweep folder  ${out}${result.complete ? '' : '  (INCOMPLETE: interrupted)'}`,
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
  return code;
}

/** "2000", or "40–120" when the varied keys change the number of ions per point. */
export function ionCount(totals: number[]): string {
  // A loop, not Math.min(...totals): spreading 10⁵ or more values overflows the call stack.
  let lo = Infinity, hi = -Infinity;
  for (const t of totals) { if (t < lo) lo = t; if (t > hi) hi = t; }
  if (totals.length === 0) return '0';
  return lo === hi ? String(lo) : `${lo}–${hi}`;
}

/** One shard of the sweep into a part folder (sim/sweeps/shard-sweep.ts). */
async function runShard(plan: SweepPlan, spec: ShardSpec, out: string, force: boolean, commandLine: string, json: boolean): Promise<number> {
  let stoppedBy: string | null = null;
  plan.req.stopped = () => stoppedBy !== null;
  const offSignals = onStopSignal((sig) => { stoppedBy = sig; });
  let r;
  try {
    r = await runSweepShard(plan, spec, out, { force, commandLine });
  } finally {
    offSignals();
  }
  const line = `shard ${spec.index}/${spec.count}: ${r.pieces} pieces in ${out}${r.complete ? '' : '  (INCOMPLETE: interrupted)'}`;
  process.stdout.write(json ? JSON.stringify({ shard: spec, pieces: r.pieces, complete: r.complete, out }) + '\n' : `${plan.base.name}\n  ${line}\n`);
  return r.complete ? 0 : interruptedExitCode();
}

/**
 * The solved fields of every point: the base scene's, then each point's whose geometry differs
 * (a swept length or spacing); points that only change volts or ions share the base's solutions.
 */
async function prepareSweepFields(file: string, plan: ReturnType<typeof planSweep>, opts: { noSolve: boolean; workers?: number }): Promise<void> {
  await prepareTracking(file, plan.base, opts);
  for (const w of solvedFieldWarnings(plan.base)) if (!plan.warnings.includes(w)) plan.warnings.push(w);
  const seen = new Set<string>([geometryOf(plan.base)]);
  for (const t of plan.tasks) {
    const scene = plan.scenes.scene(plan.axes, t.idx, t.extra);
    const g = geometryOf(scene);
    if (seen.has(g)) continue;
    seen.add(g);
    await prepareTracking(file, scene, opts);
  }
}

function geometryOf(scene: Scene): string {
  return scene.stages.map((st) => { const p = fieldProblemOf(st); return p ? cacheKey(p, DEFAULT_TOLERANCE) : '-'; }).join(',');
}
