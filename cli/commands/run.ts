// iontrail run SCENE.yaml -o DIR [--seed N] [--workers N] [--set k=v]... [--force] [--csv] [--json]

import { parseArgs, flag } from '../args.js';
import { UsageError } from '../errors.js';
import { loadSceneFile } from '../../sim/scene/load.js';
import { runScene } from '../../sim/runs/run-scene.js';
import { progressBar } from '../progress.js';

export const describe = 'integrate the ions of a scene file and write a run folder';

const USAGE = 'usage: iontrail run SCENE.yaml -o DIR [--seed N] [--workers N] [--set key=value]... [--force] [--csv] [--json]';

export function parseCount(text: string | undefined, what: string, min: number): number | undefined {
  if (text === undefined) return undefined;
  if (!/^\d+$/.test(text) || Number(text) < min) throw new UsageError(`${what} expects a whole number of at least ${min}, got '${text}'`);
  return Number(text);
}

export async function run(argv: string[]): Promise<number> {
  const a = parseArgs(argv, {
    values: ['out', 'seed', 'workers', 'set'],
    switches: ['force', 'json', 'csv', 'help'],
    repeatable: ['set'],
    aliases: { o: 'out' },
  }, 'run');
  if (a.switches.has('help')) { process.stdout.write(USAGE + '\n'); return 0; }
  if (a.positional.length !== 1) throw new UsageError(`run: give one scene file (${USAGE})`);
  const out = flag(a, 'out');
  if (!out) throw new UsageError('run: missing -o DIR (the run folder to write)');
  const file = a.positional[0];
  const seed = parseCount(flag(a, 'seed'), '--seed', 0);
  const workers = parseCount(flag(a, 'workers'), '--workers', 1);
  const { scene } = loadSceneFile(file, { set: a.values.get('set') ?? [], seed });
  const bar = progressBar('run');
  const summary = await runScene(scene, {
    out, force: a.switches.has('force'), csv: a.switches.has('csv'), workers, sceneFile: file,
    commandLine: ['iontrail', 'run', ...argv].join(' '), progress: bar.update, handleSigint: true,
  });
  bar.end();
  for (const w of summary.warnings) process.stderr.write(`warning: ${w}\n`);
  if (a.switches.has('json')) {
    process.stdout.write(JSON.stringify(summary) + '\n');
  } else {
    const lines = [`${summary.scene_name}`, `  run folder  ${out}${summary.complete ? '' : '  (INCOMPLETE: interrupted)'}`];
    for (const s of summary.species) {
      lines.push(`  m/z ${String(s.mz).padEnd(8)} z=${s.charge}  ${String(s.detected).padStart(7)} detected  ${String(s.hit).padStart(7)} hit  ${String(s.missed ?? 0).padStart(7)} missed  ${String(s.returned ?? 0).padStart(7)} returned  ${String(s.alive).padStart(7)} alive  transmission ${(100 * s.transmission).toFixed(2)} %`);
    }
    const det = summary.detector;
    if (det) lines.push(`  detector    ${det.radius_m === null ? 'unbounded' : `radius ${(det.radius_m * 1e3).toPrecision(3)} mm`} (${det.source}) in the exit plane of the last stage`);
    const st = summary.stats;
    lines.push(`  ${st.steps} ion-steps in ${st.wall_s.toFixed(2)} s (${(st.steps / Math.max(st.wall_s, 1e-9) / 1e6).toFixed(1)} M ion-steps/s)`);
    if (summary.cooling) {
      const c = summary.cooling as Record<string, number | null>;
      lines.push(`  cooling: tau ${c.tau_s === null ? 'n/a' : `${((c.tau_s as number) * 1e3).toPrecision(3)} ms`}, final mean KE ${(c.final_mean_ke_ev as number).toPrecision(3)} eV, rms radius ${((c.final_rms_radius_m as number) * 1e3).toPrecision(3)} mm, ${(c.collisions_per_ion as number).toPrecision(3)} collisions/ion`);
    }
    process.stdout.write(lines.join('\n') + '\n');
  }
  return summary.complete ? 0 : 130;
}
