// iontrail run SCENE.yaml -o DIR [--seed N] [--workers N] [--set k=v]... [--force] [--csv] [--json]

import { parseArgs, flag, type FlagSpec } from '../args.js';
import { UsageError } from '../errors.js';
import { loadSceneFile } from '../../sim/scene/load.js';
import { noSolveHelp, prepareTracking } from '../tracking.js';
import { runScene } from '../../sim/runs/run-scene.js';
import { parseShard } from '../../sim/runs/shard.js';
import { progressBar } from '../progress.js';
import { interruptedExitCode, maxOutputHelp, maxOutput, printEstimate } from '../run-limits.js';

export const describe = 'integrate the ions of a scene file and write a run folder';

const USAGE = 'usage: iontrail run SCENE.yaml -o DIR [--seed N] [--workers N] [--set key=value]... [--shard I/N] [--max-output SIZE] [--no-solve] [--force] [--csv] [--json]';

const HELP = `${USAGE}

Integrates every ion of the scene and writes the run folder DIR:
  summary.json        figures of merit, warnings and provenance (scene as resolved, seed, estimate)
  ions.arrow          one row per ion: start state, fate, end time, position, velocity and energy
  history.arrow       ensemble averages against time (mean energies, rms cloud size)
  trajectories.arrow  recorded points (every run.record_every steps), when the scene records them

  -o, --out DIR      run folder; its parent must exist
  --seed N           replace the scene's seed
  --workers N        worker threads (default: all cores; results do not depend on it)
  --set key=value    override a scene value, e.g. --set stages.0.dc=42V (repeatable)
  --shard I/N        run only slice I (0-based) of N, whole batches of ions, into a part folder
                     (with shard.json); \`iontrail merge\` joins the N parts into this run's bytes
${maxOutputHelp()}
${noSolveHelp()}  --force            replace an existing DIR (the old one is removed only once the new one is complete)
  --csv              also write ions.csv, history.csv and trajectories.csv
  --json             print summary.json to stdout instead of the short table
  -h, --help         this text

Ctrl-C or SIGTERM stops the run: the batches finished are kept, summary.json says "complete": false,
and the exit code is 130 (SIGINT) or 143 (SIGTERM).
`;

export function parseCount(text: string | undefined, what: string, min: number): number | undefined {
  if (text === undefined) return undefined;
  if (!/^\d+$/.test(text) || Number(text) < min) throw new UsageError(`${what} expects a whole number of at least ${min}, got '${text}'`);
  return Number(text);
}

/** The flags `iontrail run` accepts (the help text describes each). */
export const FLAGS: FlagSpec = {
  values: ['out', 'seed', 'workers', 'set', 'max-output', 'shard'],
  switches: ['force', 'json', 'csv', 'help', 'no-solve'],
  repeatable: ['set'],
  aliases: { o: 'out', h: 'help' },
};

export async function run(argv: string[]): Promise<number> {
  const a = parseArgs(argv, FLAGS, 'run');
  if (a.switches.has('help')) { process.stdout.write(HELP); return 0; }
  if (a.positional.length !== 1) throw new UsageError(`run: give one scene file (${USAGE})`);
  const out = flag(a, 'out');
  if (!out) throw new UsageError('run: missing -o DIR (the run folder to write)');
  const file = a.positional[0];
  const seed = parseCount(flag(a, 'seed'), '--seed', 0);
  const workers = parseCount(flag(a, 'workers'), '--workers', 1);
  const limit = maxOutput(a);
  const set = a.values.get('set') ?? [];
  const shardText = flag(a, 'shard');
  const spec = shardText === undefined ? undefined : parseShard(shardText);
  const { scene, text } = loadSceneFile(file, { set, seed });
  await prepareTracking(file, scene, { noSolve: a.switches.has('no-solve'), workers });
  const bar = progressBar('run');
  const summary = await runScene(scene, {
    out, force: a.switches.has('force'), csv: a.switches.has('csv'), workers, sceneFile: file,
    commandLine: ['iontrail', 'run', ...argv].join(' '), progress: bar.update, handleSigint: true,
    maxOutput: limit, onEstimate: printEstimate(),
    shard: spec && { spec, source: { text, file, set, seed: seed ?? null } },
  });
  bar.end();
  for (const w of summary.warnings) process.stderr.write(`warning: ${w}\n`);
  if (a.switches.has('json')) {
    process.stdout.write(JSON.stringify(summary) + '\n');
  } else {
    const part = summary.provenance.shard as { index: number; count: number; ions: [number, number] } | undefined;
    const slice = part ? `  (part ${part.index}/${part.count}: ions ${part.ions[0]}–${part.ions[1] - 1}; join the parts with iontrail merge)` : '';
    const lines = [`${summary.scene_name}`, `  run folder  ${out}${slice}${summary.complete ? '' : '  (INCOMPLETE: interrupted)'}`];
    for (const s of summary.species) {
      lines.push(`  m/z ${String(s.mz).padEnd(8)} z=${s.charge}  ${String(s.detected).padStart(7)} detected  ${String(s.hit).padStart(7)} hit  ${String(s.missed ?? 0).padStart(7)} missed  ${String(s.returned ?? 0).padStart(7)} returned  ${String(s.alive).padStart(7)} alive  transmission ${(100 * s.transmission).toFixed(2)} %`);
    }
    const det = summary.detector;
    if (det) lines.push(`  detector    ${det.radius_m === null ? 'unbounded' : `radius ${(det.radius_m * 1e3).toPrecision(3)} mm`} (${det.source}) in the exit plane of the last stage`);
    const st = summary.stats;
    lines.push(`  ${st.steps} ion-steps in ${st.wall_s.toFixed(2)} s (${(st.steps / Math.max(st.wall_s, 1e-9) / 1e6).toFixed(1)} M ion-steps/s)`);
    if (summary.cooling) {
      const c = summary.cooling as Record<string, number | null>;
      // No ion left at the end (all detected or lost): the final figures do not exist; say n/a, never NaN.
      const fig = (v: number | null, scale: number, unit: string) => (typeof v === 'number' && Number.isFinite(v) ? `${(v * scale).toPrecision(3)}${unit}` : 'n/a');
      lines.push(`  cooling: tau ${fig(c.tau_s, 1e3, ' ms')}, final mean KE ${fig(c.final_mean_ke_ev, 1, ' eV')}, rms radius ${fig(c.final_rms_radius_m, 1e3, ' mm')}, ${fig(c.collisions_per_ion, 1, '')} collisions/ion`);
    }
    process.stdout.write(lines.join('\n') + '\n');
  }
  return summary.complete ? 0 : interruptedExitCode();
}
