// iontrail demo [-o DIR]: the built-in demo of the fictional Skerry instrument family — operating
// point checks, then a design-review bundle of each demo scene in DIR/<scene>/ (default out/demo):
// report.html, report.md with its figures, results.json and the run folder under run/.
// This is what `npm start` runs.

import { existsSync, mkdirSync } from 'node:fs';
import { join, resolve, dirname } from 'node:path';
import { fileURLToPath } from 'node:url';
import { parseArgs, flag, type FlagSpec } from '../args.js';
import { loadSceneFile } from '../../sim/scene/load.js';
import { parseCount } from './run.js';
import { prepareTracking } from '../tracking.js';
import { writeReportBundle } from './report.js';
import { interruptedExitCode, maxOutputHelp, maxOutput, printEstimate } from '../run-limits.js';
import { OutputError, systemReason } from '../../sim/core/atomic.js';

export const describe = 'run the built-in demo (Skerry filter, trap and TOF scenes): a review bundle per scene in out/demo';

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '../../..').replace(/\/dist$/, '');

/** Demo scenes in the order they run, with the check lines that go with them. */
export const DEMO_SCENES = ['qf4-compact-filter.yaml', 't7-trap-cooling.yaml', 't7-mass-scan.yaml', 'lt1-linear-tof.yaml', 'rt1-reflectron-tof.yaml', 'qf4r-round-rods.yaml', 't7t-truncated-trap.yaml', 'c7-cylindrical-trap.yaml'];

const CHECKS: string[][] = [
  ['--analyzer', 'quadrupole', '--r0', '4mm', '--freq', '1.2MHz', '--rf', '832V', '--dc', '138.3V', '--mz', '502', '--rf-max', '5kV'],
  ['--analyzer', 'trap', '--r0', '7.07mm', '--freq', '1.05MHz', '--rf', '400V', '--mz', '609'],
];

/** The flags `iontrail demo` accepts (the help text describes each). */
export const FLAGS: FlagSpec = { values: ['out', 'workers', 'max-output'], switches: ['force', 'help'], aliases: { o: 'out', h: 'help' } };

export async function run(argv: string[]): Promise<number> {
  const a = parseArgs(argv, FLAGS, 'demo');
  if (a.switches.has('help')) { process.stdout.write(`usage: iontrail demo [-o DIR] [--workers N] [--max-output SIZE]\n\n  -o, --out DIR      folder of the review bundles (default out/demo; made when missing)\n  --workers N        worker threads (default: all cores)\n${maxOutputHelp()}\n  --force            accepted for symmetry; the demo always replaces its own bundles\n  -h, --help         this text\n`); return 0; }
  const out = resolve(flag(a, 'out') ?? join(process.cwd(), 'out', 'demo'));
  const workers = parseCount(flag(a, 'workers'), '--workers', 1);
  const limit = maxOutput(a);
  try {
    mkdirSync(out, { recursive: true });
  } catch (e) {
    throw new OutputError(`-o ${out}: cannot create the folder (${systemReason(e)})`);
  }
  const check = await import('./check.js');
  for (const c of CHECKS) {
    process.stdout.write(`\n$ iontrail check ${c.join(' ')}\n`);
    const code = await check.run(c);
    if (code !== 0) return code;
  }
  for (const file of DEMO_SCENES) {
    const path = join(ROOT, 'scenes', file);
    if (!existsSync(path)) continue;
    const { scene, text } = loadSceneFile(path);
    const dir = join(out, file.replace(/\.ya?ml$/, ''));
    process.stdout.write(`\n$ iontrail report scenes/${file} -o ${dir} --force\n`);
    // Scenes with electrode stages: their fields solved (or read from the field cache) first.
    await prepareTracking(`scenes/${file}`, scene, { workers });
    const r = await writeReportBundle(scene, {
      out: dir, force: true, workers, sceneFile: `scenes/${file}`, sceneText: text, commandLine: 'iontrail demo',
      progressLabel: file, handleSigint: true, maxOutput: limit, onEstimate: printEstimate(`${file}: `),
    });
    if (!r.complete) return interruptedExitCode();
    const res = r.results;
    for (const w of res.warnings) process.stderr.write(`warning: ${w}\n`);
    for (const sp of res.species) {
      process.stdout.write(`  m/z ${sp.mz}: ${sp.detected} detected, ${sp.hit} hit, ${sp.missed ?? 0} missed, ${sp.returned ?? 0} returned, ${sp.alive} alive of ${sp.total} (transmission ${(100 * sp.transmission).toFixed(1)} %)\n`);
    }
    if (res.cooling) {
      const c = res.cooling as Record<string, number | null>;
      // No ion left at the end (a scan ejects them all) leaves the final cloud size undefined.
      const milli = (v: number | null, unit: string) => (typeof v === 'number' && Number.isFinite(v) ? `${(v * 1e3).toPrecision(3)} ${unit}` : 'n/a');
      process.stdout.write(`  cooling: tau ${milli(c.tau_s, 'ms')}, final mean KE ${(c.final_mean_ke_ev as number).toPrecision(3)} eV, rms radius ${milli(c.final_rms_radius_m, 'mm')}\n`);
    }
    process.stdout.write(`  report: ${join(dir, 'report.html')} (${res.figures.length} figures)\n`);
  }
  // The T-7 capacity curve (space charge): a sweep over the macro-ion weight and its figure.
  const cap = join(out, 't7-capacity');
  const capArgs = ['scenes/t7-capacity.yaml', '--vary', 'space_charge.weight=1..400:5', '--collect',
    'space_charge.real_charges,space_charge.frequency_shift_z,space_charge.frequency_shift_r,space_charge.rms_radius_m,space_charge.lost',
    '-o', cap, '--force', ...(workers ? ['--workers', String(workers)] : []), ...(flag(a, 'max-output') ? ['--max-output', flag(a, 'max-output')!] : [])];
  process.stdout.write(`\n$ iontrail sweep ${capArgs.join(' ')}\n`);
  const sweep = await import('./sweep.js');
  const prevCwd = process.cwd();
  process.chdir(ROOT);
  try {
    const code = await sweep.run(capArgs);
    if (code !== 0) return code;
    const plot = await import('./plot.js');
    const plotArgs = [cap, '--kind', 'sweep', '--x', 'space_charge.real_charges', '--y',
      'space_charge.frequency_shift_z,space_charge.frequency_shift_r,space_charge.rms_radius_m', '-o', join(cap, 'capacity.png')];
    process.stdout.write(`$ iontrail plot ${plotArgs.join(' ')}\n`);
    if ((await plot.run(plotArgs)) !== 0) return 2;
  } finally {
    process.chdir(prevCwd);
  }
  process.stdout.write(`\nreview bundles in ${out} (open <scene>/report.html; run folders in <scene>/run)\n`);
  process.stdout.write('Simulated operating points must be verified on the bench before use. RF and DC supplies of these instruments are lethal: follow local electrical-safety codes and leave high-voltage work to qualified staff.\n');
  return 0;
}
