// npm run gallery: regenerates the README figures in scenes/gallery/ from the demo scenes, with the
// same commands a user types (iontrail run, plot, render, field). Run folders go to out/gallery/.

import { copyFileSync, mkdirSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { main } from './main.js';

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '../..').replace(/\/dist$/, '');
// Paths relative to the repository, so the figures' provenance footers name them that way.
process.chdir(ROOT);
const RUNS = join('out', 'gallery');
const FIGS = join('scenes', 'gallery');

async function iontrail(...args: string[]): Promise<void> {
  process.stdout.write(`$ iontrail ${args.join(' ')}\n`);
  const code = await main(args);
  if (code !== 0) throw new Error(`iontrail ${args[0]} exited ${code}`);
}

mkdirSync(RUNS, { recursive: true });
mkdirSync(FIGS, { recursive: true });
// `npm run gallery -- fields` regenerates only the electrode-field figures (a minute instead of many).
const only = process.argv[2];
const fig = (name: string) => join(FIGS, name);

// Electrode fields: `iontrail field` writes a folder; its figures are copied in under gallery names.
for (const [scene, name] of [['qf4r-round-rods.yaml', 'qf4r'], ['t7t-truncated-trap.yaml', 't7t']]) {
  const dir = join(RUNS, `${name}-field`);
  await iontrail('field', join('scenes', scene), '-o', dir, '--force');
  for (const f of ['equipotential', 'deviation', 'multipoles']) {
    if (name === 'qf4r' && f === 'multipoles') continue; // 3D grids have no multipole chart
    copyFileSync(join(dir, `${f}.png`), fig(`field-${name}-${f}.png`));
  }
}
if (only === 'fields') {
  process.stdout.write(`figures in ${FIGS}\n`);
  process.exit(0);
}
const run = (scene: string, name: string, ...extra: string[]) =>
  iontrail('run', join('scenes', scene), '-o', join(RUNS, name), '--force', ...extra);

await run('qf4-compact-filter.yaml', 'qf4', '--set', 'ions.0.count=300');
await run('t7-trap-cooling.yaml', 't7');
await run('lt1-linear-tof.yaml', 'lt1');
await run('rt1-reflectron-tof.yaml', 'rt1');
await iontrail('plot', join(RUNS, 'qf4'), '--kind', 'traces', '--ions', '0-3', '-o', fig('traces.png'));
await iontrail('plot', join(RUNS, 'qf4'), '--kind', 'stability', '-o', fig('stability.png'));
await iontrail('plot', join(RUNS, 'qf4'), '--kind', 'phase', '-o', fig('phase.png'));
await iontrail('plot', join(RUNS, 't7'), '--kind', 'xy', '-o', fig('xy.png'));
await iontrail('plot', join(RUNS, 't7'), '--kind', 'cooling', '-o', fig('cooling.png'));
await iontrail('plot', join(RUNS, 't7'), '--kind', 'stability', '-o', fig('stability-trap.png'));
await iontrail('plot', join(RUNS, 'lt1'), '--kind', 'arrival', '-o', fig('arrival.png'));
await iontrail('plot', join(RUNS, 'rt1'), '--kind', 'energy', '-o', fig('energy.png'));
await iontrail('render', join(RUNS, 'qf4'), '--ions', '0-59', '-o', fig('scene3d-filter.png'));
await iontrail('render', join(RUNS, 't7'), '--ions', '0-39', '-o', fig('scene3d-trap.png'));
await iontrail('sweep', join('scenes', 't7-capacity.yaml'), '--vary', 'space_charge.weight=1..400:6', '--collect',
  'space_charge.real_charges,space_charge.frequency_shift_z,space_charge.frequency_shift_r,space_charge.rms_radius_m,space_charge.lost',
  '-o', join(RUNS, 'capacity'), '--force');
await iontrail('plot', join(RUNS, 'capacity'), '--kind', 'sweep', '--x', 'space_charge.real_charges',
  '--y', 'space_charge.frequency_shift_z,space_charge.frequency_shift_r,space_charge.rms_radius_m', '-o', fig('capacity.png'));
await iontrail('sweep', join('scenes', 't7-mass-scan.yaml'), '--vary', 'gas.pressure=0.1mTorr..8mTorr:5', '--set', 'ions.0.count=200',
  '--set', 'ions.1.count=200', '--set', 'ions.2.count=200',
  '--collect', 'scan.species.0.fwhm_mz,scan.species.1.fwhm_mz,scan.species.2.fwhm_mz,scan.species.1.ejection_qz_mean',
  '-o', join(RUNS, 'scan-pressure'), '--force');
await iontrail('plot', join(RUNS, 'scan-pressure'), '--kind', 'sweep',
  '--y', 'scan.species.1.fwhm_mz,scan.species.1.ejection_qz_mean', '-o', fig('scan-pressure.png'));
await iontrail('sweep', join('scenes', 'qf4-peak-scan.yaml'), '--vary', 'mz=490..514:121', '-o', join(RUNS, 'peak'), '--force');
await iontrail('plot', join(RUNS, 'peak'), '--kind', 'sweep', '-o', fig('peak.png'));
await run('cg8-octupole-guide.yaml', 'cg8');
await iontrail('plot', join(RUNS, 'cg8'), '--kind', 'radial', '-o', fig('radial.png'));
await iontrail('sweep', join('scenes', 'cg8-guide-transmission.yaml'), '--vary', 'mz=10..400:40', '-o', join(RUNS, 'cg8-octupole'), '--force');
await iontrail('plot', join(RUNS, 'cg8-octupole'), '--kind', 'sweep', '--y', 'transmission', '-o', fig('guide-octupole.png'));
await iontrail('sweep', join('scenes', 'cg8-guide-transmission.yaml'), '--vary', 'mz=10..400:40', '--set', 'stages.0.poles=4', '-o', join(RUNS, 'cg8-quadrupole'), '--force');
await iontrail('plot', join(RUNS, 'cg8-quadrupole'), '--kind', 'sweep', '--y', 'transmission', '-o', fig('guide-quadrupole.png'));
// The linear trap's spectrum is the review bundle's figure.
await iontrail('report', join('scenes', 'lq2-linear-trap.yaml'), '-o', join(RUNS, 'lq2-review'), '--force');
copyFileSync(join(RUNS, 'lq2-review', 'fig-spectrum.png'), fig('spectrum-linear-trap.png'));
// The solved demo scenes in 3D, their electrodes drawn from the shapes of the scene file.
await run('qf4r-round-rods.yaml', 'qf4r', '--set', 'ions.0.count=40');
await iontrail('render', join(RUNS, 'qf4r'), '-o', fig('scene3d-round-rods.png'));
await run('t7t-truncated-trap.yaml', 't7t', '--set', 'ions.0.count=20');
await iontrail('render', join(RUNS, 't7t'), '-o', fig('scene3d-truncated-trap.png'));
// prefilter.png: the QF-4P peak at high resolution with and without its RF-only prefilter.
for (const v of ['prefilter', 'no-prefilter']) {
  await iontrail('sweep', join('scenes', `qf4p-${v}.yaml`), '--vary', 'mz=499..502.5:15', '-o', join(RUNS, `qf4p-${v}`), '--force');
}
await iontrail('plot', join(RUNS, 'qf4p-prefilter'), join(RUNS, 'qf4p-no-prefilter'), '--kind', 'sweep', '--y', 'transmission', '-o', fig('prefilter.png'));
// trap-stretch.png: the T-7T mass scan against the end-cap shift (solved fields, seven solves).
await iontrail('sweep', join('scenes', 't7t-mass-scan.yaml'), '--vary', 'stages.0.electrodes.1.shapes.0.hyperboloid.shift=0mm..0.6mm:7',
  '--set', 'ions.1.count=120', '--collect', 'scan.species.1.ejection_qz_mean,scan.species.1.apparent_mz,scan.species.1.ejected',
  '-o', join(RUNS, 't7t-stretch'), '--force');
await iontrail('plot', join(RUNS, 't7t-stretch'), '--kind', 'sweep', '--y', 'scan.species.1.ejection_qz_mean,scan.species.1.apparent_mz', '-o', fig('trap-stretch.png'));
// Round rods beside hyperbolic rods (peak-round-vs-hyperbolic.png): the report's overlay of both peaks.
await iontrail('report', join('scenes', 'qf4r-peak-scan.yaml'), '--beside', join('scenes', 'qf4-peak-scan.yaml'), '--vary', 'mz=496..508:41',
  '--set', 'ions.0.count=200', '-o', join(RUNS, 'qf4r-beside'), '--force');
copyFileSync(join(RUNS, 'qf4r-beside', 'fig-peaks-beside.png'), fig('peak-round-vs-hyperbolic.png'));
process.stdout.write(`figures in ${FIGS}\n`);
