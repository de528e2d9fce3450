// iontrail field SCENE.yaml -o DIR [--stage N] [--force] [--json]
// iontrail field SCENE.yaml --at X,Y,Z [--at ...] [--time T] [--json]

import { existsSync, mkdirSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { freemem } from 'node:os';
import { basename, dirname, join, resolve } from 'node:path';
import { parseArgs, flag, type FlagSpec } from '../args.js';
import { UsageError } from '../errors.js';
import { parseCount } from './run.js';
import { loadSceneFile } from '../../sim/scene/load.js';
import { SceneError } from '../../sim/scene/schema.js';
import { keyPath, keyWhere } from '../../sim/scene/locate.js';
import { fieldProblemOf, kindOf, rfOf } from '../../sim/stages/registry.js';
import type { Stage } from '../../sim/stages/types.js';
import { FieldInputError, type FieldProblem, type FieldSolution } from '../../sim/fields/problem.js';
import { cacheRoot, solveCached } from '../../sim/fields/cache.js';
import { GridInterpolant } from '../../sim/fields/interpolate.js';
import { gridJson, voltsAt, writeFieldFiles } from '../../sim/fields/folder.js';
import { fieldMap } from '../../sim/fields/slice.js';
import { idealField } from '../../sim/fields/ideal.js';
import { parseQuantity } from '../../sim/units/quantity.js';
import { folderBeside, swapFolderIntoPlace } from '../../sim/core/atomic.js';
import { finiteOrNull } from '../../sim/core/json.js';
import { TOOL_VERSION } from '../../sim/version.js';
import { deviationSpec, equipotentialSpec, multipoleSpec, renderSpec, type Bar, type FieldFigureText } from '../../render/fields/figures.js';
import { axisLegendre, axisSeriesFrame, checkProblem, fitMultipoles, solveField } from '../../sim/fields/index.js';

export const describe = 'solve the electrode fields of a scene: unit solutions (.npy, .vti), multipoles and field maps';

const USAGE = 'usage: iontrail field SCENE.yaml -o DIR [--stage N] [--workers N] [--force] [--json] | iontrail field SCENE.yaml --at X,Y,Z [--at ...] [--time T] [--json]';

const HELP = `${USAGE}

Solves the Laplace equation of each electrodes stage (one unit solution per electrode: that
electrode at 1 V, every other electrode and the grounded box edge at 0 V) and writes DIR:
  unit-K-NAME.npy     float32 NumPy array per electrode (V per V), C order
  unit-K-NAME.json    its grid: origin, spacing, node counts, the .npy axis order
  field.vti           every unit solution as a point array (VTK ImageData, for ParaView)
  summary.json        grid, nodes, iterations, final residual, wall time, memory, multipoles
                      (planar grids) or axis Legendre coefficients (axial grids) at the dc volts
  equipotential.png/.svg, deviation.png/.svg (where an ideal field exists), multipoles.png/.svg
With several electrodes stages and no --stage, each goes to DIR/stage-N/.
Solutions are cached by geometry and grid in DIR's parent (.iontrail-cache), or for --at in
$XDG_CACHE_HOME/iontrail (else ~/.cache/iontrail).

  -o, --out DIR      field folder; its parent must exist
  --stage N          the stage to solve (its index in the scene's stages list)
  --workers N        worker threads for the unit solutions (default: all cores)
  --force            replace an existing DIR (the old one is removed only once the new one is complete)
  --at X,Y,Z         print potential and field at a point instead (lab coordinates, z along the
                     instrument from the first stage's entrance; lengths with units, e.g.
                     1mm,0mm,20mm, or plain numbers in metres); repeatable
  --time T           time of the RF drive for --at (default 0 s): volts = dc + rf × V cos(Ωt + φ)
  --json             print summary.json (or the --at points) as JSON
  -h, --help         this text

Simulated fields must be verified on the bench before use; electrode voltages of these
instruments are lethal: follow local electrical-safety codes and leave high-voltage work to
qualified staff.
`;

export const FLAGS: FlagSpec = {
  values: ['out', 'stage', 'at', 'time', 'workers'],
  switches: ['force', 'json', 'help'],
  repeatable: ['at'],
  aliases: { o: 'out', h: 'help' },
};

/** Solver tolerance: relative residual of the Krylov iteration (issue 12: 1e-10 by default). */
const TOLERANCE = 1e-10;
const MULTIPOLE_ORDERS = 20;

interface Target { st: Stage; problem: FieldProblem; index: number }

function targets(stages: readonly Stage[], file: string, which: number | undefined): Target[] {
  const all = stages.map((st, i) => ({ st, problem: fieldProblemOf(st), index: st.sceneIndex ?? i }))
    .filter((t): t is Target => t.problem !== undefined);
  if (all.length === 0) throw new UsageError(`${file}: the scene has no stage whose field is solved from electrodes (a stage of type: electrodes)`);
  if (which === undefined) return all;
  const t = all.filter((x) => x.index === which);
  if (t.length === 0) throw new UsageError(`--stage ${which}: stage ${which} of ${file} has no electrodes; expected one of ${all.map((x) => x.index).join(', ')}`);
  return t;
}

/** A FieldInputError about key k of stage i as the loader's one line: file:line: stages.i.k: message. */
function located(e: unknown, text: string, file: string, index: number): never {
  if (e instanceof FieldInputError) throw new SceneError(`${keyWhere(text, file, ['stages', index, ...keyPath(e.key)])}: ${e.message}`);
  throw e;
}

async function solve(t: Target, text: string, file: string, root: string, workers: number | undefined): Promise<{ solution: FieldSolution; hit: boolean }> {
  try {
    checkProblem(t.problem, { freeMemoryBytes: freemem() });
    return await solveCached(t.problem, TOLERANCE, root, () => solveField(t.problem, { workers, tolerance: TOLERANCE }));
  } catch (e) {
    return located(e, text, file, t.index);
  }
}

function point(text: string): [number, number, number] {
  const parts = text.split(',').map((s) => s.trim());
  if (parts.length !== 3) throw new UsageError(`--at expects X,Y,Z such as 1mm,0mm,20mm, got '${text}'`);
  return parts.map((p) => {
    if (/^[-+]?(\d+\.?\d*|\.\d+)(e[-+]?\d+)?$/i.test(p)) return Number(p);
    try { return parseQuantity(p, 'length', '--at'); } catch { throw new UsageError(`--at expects lengths such as 1mm,0mm,20mm (or metres), got '${p}' in '${text}'`); }
  }) as [number, number, number];
}

export async function run(argv: string[]): Promise<number> {
  const a = parseArgs(argv, FLAGS, 'field');
  if (a.switches.has('help')) { process.stdout.write(HELP); return 0; }
  if (a.positional.length !== 1) throw new UsageError(`field: give one scene file (${USAGE})`);
  const file = a.positional[0];
  const out = flag(a, 'out');
  const at = a.values.get('at') ?? [];
  if (!out && at.length === 0) throw new UsageError('field: missing -o DIR (the field folder to write) or --at X,Y,Z');
  if (out && at.length > 0) throw new UsageError('field: give either -o DIR or --at, not both');
  const which = parseCount(flag(a, 'stage'), '--stage', 0);
  const workers = parseCount(flag(a, 'workers'), '--workers', 1);
  const timeText = flag(a, 'time');
  if (timeText !== undefined && at.length === 0) throw new UsageError('field: --time goes with --at');
  let time = 0;
  if (timeText !== undefined) {
    try { time = parseQuantity(timeText, 'time', '--time'); } catch { throw new UsageError(`--time expects a time such as 0.2 us, got '${timeText}'`); }
  }
  const points = at.map(point);
  const { scene, text } = loadSceneFile(file);
  const chosen = targets(scene.stages, file, which);
  if (out) return writeFolders(out, chosen, { file, text, scene, workers, force: a.switches.has('force'), json: a.switches.has('json'), argv });
  return printPoints(points, time, chosen, { file, text, workers, json: a.switches.has('json') });
}

async function printPoints(points: [number, number, number][], time: number, chosen: Target[], o: { file: string; text: string; workers?: number; json: boolean }): Promise<number> {
  const root = cacheRoot();
  const rows: Record<string, number | null>[] = [];
  const solved = [] as { t: Target; its: GridInterpolant[]; volts: number[] }[];
  for (const t of chosen) {
    const { solution } = await solve(t, o.text, o.file, root, o.workers);
    solved.push({ t, its: solution.units.map((u) => new GridInterpolant(solution.grid, u)), volts: voltsAt(t.problem, rfOf(t.st), time) });
  }
  const v = new Float64Array(4);
  for (const [x, y, z] of points) {
    const row: Record<string, number | null> = { x, y, z, potential_v: null, e_x: null, e_y: null, e_z: null };
    // The stage the point lies in (along z); a point in none of them gets nulls.
    const s = solved.find(({ t }) => z >= t.st.zStart && z <= t.st.zEnd);
    if (s) {
      let p = 0, gx = 0, gy = 0, gz = 0, ok = true;
      for (let k = 0; k < s.its.length && ok; k++) {
        ok = s.its[k].evaluate(x, y, z - s.t.st.zStart, v);
        p += s.volts[k] * v[0]; gx += s.volts[k] * v[1]; gy += s.volts[k] * v[2]; gz += s.volts[k] * v[3];
      }
      if (ok) Object.assign(row, { potential_v: p, e_x: -gx, e_y: -gy, e_z: -gz });
    }
    rows.push(row);
  }
  if (o.json) process.stdout.write(JSON.stringify(rows, finiteOrNull) + '\n');
  else {
    const f = (n: number | null, d: number) => (n === null ? 'outside' : n.toPrecision(d));
    for (const r of rows) process.stdout.write(`(${[r.x, r.y, r.z].map((c) => `${((c as number) * 1e3).toPrecision(4)} mm`).join(', ')})  φ ${f(r.potential_v, 7)} V  E (${f(r.e_x, 5)}, ${f(r.e_y, 5)}, ${f(r.e_z, 5)}) V/m\n`);
  }
  return 0;
}

interface FolderOpts { file: string; text: string; scene: { name: string }; workers?: number; force: boolean; json: boolean; argv: string[] }

async function writeFolders(out: string, chosen: Target[], o: FolderOpts): Promise<number> {
  const target = resolve(out);
  const parent = dirname(target);
  if (!existsSync(parent) || !statSync(parent).isDirectory()) throw new UsageError(`-o ${out}: parent folder ${parent} does not exist`);
  if (existsSync(target) && !o.force) throw new UsageError(`-o ${out}: already exists (give --force to replace it)`);
  const root = cacheRoot(parent);
  const solved: { t: Target; solution: FieldSolution; hit: boolean }[] = [];
  // Every stage solved (and every check passed) before anything is written.
  for (const t of chosen) solved.push({ t, ...(await solve(t, o.text, o.file, root, o.workers)) });
  const temp = folderBeside(target);
  const summaries: Record<string, unknown>[] = [];
  try {
    for (const s of solved) {
      const dir = chosen.length > 1 ? join(temp, `stage-${s.t.index}`) : temp;
      if (dir !== temp) mkdirSync(dir);
      summaries.push(await writeOne(dir, s, o, basename(target)));
    }
    swapFolderIntoPlace(temp, target, true);
  } catch (e) {
    rmSync(temp, { recursive: true, force: true });
    throw e;
  }
  if (o.json) process.stdout.write(JSON.stringify(summaries.length === 1 ? summaries[0] : summaries, finiteOrNull) + '\n');
  else {
    for (const s of summaries as any[]) {
      process.stdout.write(`${o.scene.name}: stage ${s.stage} (${s.stage_description})\n  field folder  ${out}${chosen.length > 1 ? `/stage-${s.stage}` : ''}\n`);
      process.stdout.write(`  ${s.grid.node_count} nodes, ${s.electrodes.length} unit solutions, ${s.solve.iterations.join('/')} iterations, residual ≤ ${Math.max(...s.solve.final_residual).toExponential(1)}, ${s.solve.wall_s.toFixed(2)} s${s.solve.cache === 'hit' ? ' (cached)' : ''}\n`);
    }
  }
  return 0;
}

async function writeOne(dir: string, s: { t: Target; solution: FieldSolution; hit: boolean }, o: FolderOpts, folderName: string): Promise<Record<string, unknown>> {
  const { t, solution } = s;
  const problem = t.problem;
  const rf = rfOf(t.st);
  const kind = kindOf(t.st);
  const stored = t.st as unknown as Record<string, unknown>;
  const files = writeFieldFiles(dir, problem, solution, 'field.vti');
  const st = solution.stats;
  const summary: Record<string, unknown> = {
    scene_name: o.scene.name,
    stage: t.index,
    stage_description: kind.describe(stored),
    units: { lengths: 'm', potentials: 'V', unit_solutions: 'V per V', time: 's', memory: 'bytes' },
    grid: gridJson(solution.grid),
    boundary: 'the box edge is grounded (0 V) unless an electrode covers it; mirror planes are symmetry planes (zero normal field)',
    electrodes: problem.electrodes.map((e, k) => ({ name: e.name, dc_v: e.potential.dc, rf: e.potential.rf, aux: e.potential.aux, file: files[2 * k] })),
    rf: rf ? { amplitude_v: rf.amplitude, frequency_hz: rf.frequency, phase_rad: rf.phase } : null,
    solve: {
      tolerance: TOLERANCE, iterations: st.iterations, final_residual: st.residual, contraction_per_cycle: st.contraction,
      wall_s: st.wallSeconds, memory_bytes: st.memoryBytes, cache: s.hit ? 'hit' : 'miss',
    },
  };
  const dcVolts = problem.electrodes.map((e) => e.potential.dc);
  let bars: Bar[] | undefined;
  let barWhat = '';
  if (problem.grid.symmetry === 'planar' && problem.grid.referenceRadius !== undefined) {
    const m = fitMultipoles(solution, problem, { nMax: MULTIPOLE_ORDERS, referenceRadius: problem.grid.referenceRadius });
    summary.multipoles = m;
    summary.multipoles_about = { reference_radius_m: problem.grid.referenceRadius, at: 'electrodes at their dc volts', form: 'Φ(r, θ) = Σ (cos_v cos nθ + sin_v sin nθ)(r / reference_radius)^n' };
    bars = m.map((c) => ({ n: c.n, parts: [{ label: 'cos_v', value: c.cos_v }, { label: 'sin_v', value: c.sin_v }] }));
    barWhat = 'multipole coefficient';
  } else if (problem.grid.symmetry === 'axial') {
    const l = axisLegendre(solution, problem, { nMax: MULTIPOLE_ORDERS });
    summary.axis_legendre = l;
    const frame = axisSeriesFrame(problem);
    summary.axis_legendre_about = { center_z_m: frame.about, scale_m: frame.scale, at: 'electrodes at their dc volts', form: 'φ(0, z) = Σ c_v P_n((z − center_z) / scale), fitted on the axis within ±scale (grid.reference_radius, else half the stage length)' };
    bars = legendreBars(l);
    barWhat = 'axis coefficient';
  }
  // Figures: the potential at t = 0 (dc + RF at its phase), as --at reports it by default.
  const volts = voltsAt(problem, rf, 0);
  const footer = `iontrail ${TOOL_VERSION}  ·  scene ${o.file}  ·  field ${folderName}  ·  grid ${(solution.grid.spacing * 1e3).toPrecision(3)} mm, ${(summary.grid as any).node_count} nodes`;
  const labels = kind.electrodeLabels(stored).map((l) => l.text);
  const text = (what: string, sub: string): FieldFigureText => ({ title: `${o.scene.name} — ${what}`, subtitle: `${kind.describe(stored)}; ${sub}`, footer, electrodes: labels });
  const is3d = solution.grid.symmetry === 'none';
  const figs: string[] = [];
  const write = async (name: string, spec: Parameters<typeof renderSpec>[0]) => {
    for (const fmt of ['png', 'svg'] as const) {
      writeFileSync(join(dir, `${name}.${fmt}`), await renderSpec(spec, fmt));
      figs.push(`${name}.${fmt}`);
    }
  };
  const map = fieldMap(solution, volts, is3d ? 1 : 2, 0);
  await write('equipotential', equipotentialSpec(map, text('equipotentials', `electrodes at t = 0 (dc + RF at its phase)`)).spec);
  const ideal = idealField(problem, volts);
  if (ideal) {
    const mid = is3d ? fieldMap(solution, volts, 2, problem.grid.length / 2) : map;
    const dev = new Float64Array(mid.values.length);
    const nu = mid.u.coords.length;
    const mags: number[] = [];
    for (let i = 0; i < dev.length; i++) {
      const u = mid.u.coords[i % nu], v = mid.v.coords[Math.floor(i / nu)];
      // Axial maps are z across, r up; the ideal forms take (r, ·, z).
      const [px, py, pz] = solution.grid.symmetry === 'axial' ? [Math.abs(v), 0, u] : [u, v, 0];
      dev[i] = mid.inside[i] < 0 && ideal.inRegion(px, py, pz) ? mid.values[i] - ideal.potential(px, py, pz) : NaN;
      if (Number.isFinite(dev[i])) mags.push(Math.abs(dev[i]));
    }
    mags.sort((p, q) => p - q);
    // Colour full at the 99th percentile, so a few nodes beside a rod do not wash out the rest.
    const clip = mags.length ? mags[Math.floor(0.99 * (mags.length - 1))] : 1;
    summary.deviation = { ideal: ideal.label, plane: mid.plane, max_abs_v: mags.length ? mags[mags.length - 1] : null, p99_abs_v: clip, at: 'electrodes at t = 0' };
    await write('deviation', deviationSpec(mid, dev, clip, ideal.label, text('deviation from the ideal field', `${mid.plane}; electrodes at t = 0`)));
  }
  if (bars && bars.length > 0) await write('multipoles', multipoleSpec(bars, barWhat, 'V', text(problem.grid.symmetry === 'planar' ? 'multipole content' : 'axis potential, Legendre content', 'electrodes at their dc volts')));
  summary.files = [...files, ...figs, 'summary.json'];
  summary.provenance = { tool_version: TOOL_VERSION, scene_file: o.file, command_line: ['iontrail', 'field', ...o.argv].join(' ') };
  summary.caution = 'Simulated fields must be verified on the bench before use. Electrode voltages are lethal: follow local electrical-safety codes and leave high-voltage work to qualified staff.';
  writeFileSync(join(dir, 'summary.json'), JSON.stringify(summary, finiteOrNull, 2) + '\n');
  return summary;
}

/** Bars of the axis expansion, whatever its entries call the coefficient (n and one number). */
function legendreBars(l: unknown): Bar[] {
  if (!Array.isArray(l)) return [];
  return l.map((c: Record<string, unknown>) => {
    const value = Object.entries(c).find(([k, v]) => k !== 'n' && typeof v === 'number')?.[1] as number | undefined;
    return { n: Number(c.n), parts: [{ label: 'coefficient', value: value ?? 0 }] };
  }).filter((b) => Number.isFinite(b.n));
}
