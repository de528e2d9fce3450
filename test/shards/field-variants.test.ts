// `iontrail field SCENE --vary KEY=a,b,c [--shard I/N] -o DIR`: geometry variants solved one
// folder each, and the shards of a job write the folders one machine writes, byte for byte
// (summary.json apart from the solve's wall time and memory, which depend on the worker count, and
// the command line). Each variant must really be its own geometry: its unit solution is checked
// against the closed form of the coaxial capacitor with that variant's outer radius.
//
// Closed form: inner radius a at 1 V, outer radius b at 0 V, φ(r) = ln(b/r) / ln(b/a) (Jackson,
// Classical Electrodynamics, 3rd ed., §1.13). Tolerance: test/fields/coaxial.test.ts bounds the
// solver's error by 2e-4 per volt at spacing b/32; this grid is 2 to 4 times coarser and the
// error is of second order, so ≤ 16 × 2e-4 ≈ 3e-3 per volt; the variants differ by more than
// 0.08 per volt at the node checked, so the check tells them apart.

import { describe, expect, it } from 'vitest';
import { existsSync, mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { iontrail, tempDir } from '../helpers/cli.js';
import { cli, shell } from './compare.js';
import { COAX_OUTER_KEY, coaxScene } from './scenes.js';
import { parseVariantAxis, planVariants, variantsOf } from '../../sim/sweeps/field-variants.js';

const SCENE = coaxScene('Skerry C-2 coaxial variants');

const KEY = COAX_OUTER_KEY;
const OUTER_MM = [3.5, 4, 4.5];
const VARY = `${KEY}=${OUTER_MM.map((b) => `${b}mm`).join(',')}`;

/** The float32 data of a .npy file, read by its NEP 1 header (magic, version, header length). */
function npyData(path: string): Float32Array {
  const b = readFileSync(path);
  expect(b.subarray(0, 6).toString('latin1')).toBe('\x93NUMPY');
  const start = 10 + b.readUInt16LE(8);
  return new Float32Array(b.buffer.slice(b.byteOffset + start, b.byteOffset + b.byteLength));
}

function files(dir: string): string[] {
  return readdirSync(dir, { recursive: true, withFileTypes: true }).filter((e) => e.isFile())
    .map((e) => join(e.parentPath ?? (e as unknown as { path: string }).path, e.name).slice(dir.length + 1)).sort();
}

/** Same files, same bytes; summary.json the same once the solve's wall time, memory and the command line are. */
function expectSameVariants(full: string, sharded: string): void {
  const names = files(full);
  expect(files(sharded)).toEqual(names);
  for (const f of names) {
    if (f.endsWith('summary.json')) {
      const a = JSON.parse(readFileSync(join(full, f), 'utf8'));
      const b = JSON.parse(readFileSync(join(sharded, f), 'utf8'));
      for (const k of ['wall_s', 'memory_bytes']) b.solve[k] = a.solve[k];
      b.provenance.command_line = a.provenance.command_line;
      expect(b, f).toEqual(a);
    } else {
      expect(readFileSync(join(sharded, f)).equals(readFileSync(join(full, f))), `${f} byte-identical`).toBe(true);
    }
  }
}

describe('field solves of geometry variants, sharded one variant per task', () => {
  const d = tempDir();
  const scene = join(d, 'coax.yaml');
  writeFileSync(scene, SCENE);
  const under = (name: string) => { mkdirSync(join(d, name)); return join(d, name, 'variants'); };
  // Each job in a folder of its own, so that no job reads another's solutions from the cache.
  const full = under('full');

  it('unsharded: one folder per variant, each the coaxial closed form of its own outer radius', () => {
    cli(['field', scene, '--vary', VARY, '-o', full, '--workers', '1']);
    const plan = JSON.parse(readFileSync(join(full, 'variants.json'), 'utf8'));
    expect(plan.variants.map((v: { folder: string }) => v.folder)).toEqual(['variant-0', 'variant-1', 'variant-2']);
    OUTER_MM.forEach((bMm, k) => {
      expect(plan.variants[k].values[KEY]).toBeCloseTo(bMm * 1e-3, 12);
      const dir = join(full, `variant-${k}`);
      const grid = JSON.parse(readFileSync(join(dir, 'unit-0-inner.json'), 'utf8')).grid;
      expect([grid.origin_m.x, grid.origin_m.y, grid.spacing_m]).toEqual([0, 0, 0.00025]);
      // The node at (3 mm, 0): row y = 0, column x = 12 (C order, axes y, x).
      const phi = npyData(join(dir, 'unit-0-inner.npy'))[12];
      const a = 2e-3, b = bMm * 1e-3, r = 3e-3;
      expect(Math.abs(phi - Math.log(b / r) / Math.log(b / a)), `variant ${k}: b = ${bMm} mm`).toBeLessThan(3e-3);
    });
  }, 120_000);

  it('a Slurm array of 3 tasks (one variant each), run as Slurm would on 1 and 2 CPUs, writes the unsharded bytes', () => {
    const job = join(d, 'job');
    cli(['cluster', 'slurm', scene, '--field', '--vary', VARY, '--shards', '3', '-o', job]);
    expect(existsSync(join(job, 'merge.sbatch')), 'variant folders need no merge').toBe(false);
    expect(readFileSync(join(job, 'shards.sbatch'), 'utf8')).toContain('#SBATCH --array=0-2');
    for (let i = 0; i < 3; i++) shell(`bash ${join(job, 'shards.sbatch')}`, { SLURM_ARRAY_TASK_ID: String(i), SLURM_CPUS_PER_TASK: String(1 + (i % 2)) });
    expectSameVariants(full, join(job, 'result'));
  }, 120_000);

  it('fewer shards than variants take contiguous ranges; two keys give every combination, first key slowest', () => {
    const plan = planVariants([parseVariantAxis(VARY, SCENE, 'coax.yaml'), parseVariantAxis('stages.0.grid.spacing=0.25mm,0.2mm', SCENE, 'coax.yaml')]);
    const want = [3.5, 4, 4.5].flatMap((b) => [0.25, 0.2].map((h) => [b * 1e-3, h * 1e-3]));
    expect(plan.variants).toHaveLength(6);
    plan.variants.forEach((v, k) => {
      v.values.forEach((x, j) => expect(x).toBeCloseTo(want[k][j], 15));
      // The override carries the SI value in full, so the variant's scene holds exactly that double.
      expect(v.set).toEqual([`${KEY}=${v.values[0]} m`, `stages.0.grid.spacing=${v.values[1]} m`]);
    });
    const slices = [0, 1, 2, 3].map((i) => variantsOf(plan, { index: i, count: 4 }).map((v) => v.folder));
    expect(slices).toEqual([['variant-0'], ['variant-1', 'variant-2'], ['variant-3'], ['variant-4', 'variant-5']]);
    expect(() => planVariants([parseVariantAxis(VARY, SCENE, 'f'), parseVariantAxis(VARY, SCENE, 'f')])).toThrow(/varied twice/);
    expect(() => parseVariantAxis(`${KEY}=4mm,4mm`, SCENE, 'f')).toThrow(/4mm is given twice/);
    expect(() => parseVariantAxis('stages.0.grid.nodes=3,4', SCENE, 'coax.yaml')).toThrow(/--vary stages\.0\.grid\.nodes: unknown key 'stages\.0\.grid\.nodes' in coax\.yaml/);
  });

  it('bad input: one line, exit 2, nothing written', () => {
    const out = join(d, 'bad');
    const cases: [string[], RegExp][] = [
      [['--vary', VARY, '--shard', '0/4'], /the solve has 3 geometry variants and a shard solves whole variants; give at most 3 shards/],
      [['--vary', `${KEY}=3.5mm,4V`], new RegExp(`--vary ${KEY.replace(/\./g, '\\.')}.*length`)],
    ];
    for (const [args, msg] of cases) {
      const r = iontrail(['field', scene, ...args, '-o', out]);
      expect(r.code, args.join(' ')).toBe(2);
      expect(r.stderr.trim().split('\n'), r.stderr).toHaveLength(1);
      expect(r.stderr).toMatch(msg);
      expect(existsSync(out), 'nothing written').toBe(false);
    }
    // A folder of another plan is not mixed into: its variant-1 would mean another radius.
    const before = readFileSync(join(full, 'variants.json'), 'utf8');
    const r = iontrail(['field', scene, '--vary', `${KEY}=3.6mm,4.1mm`, '-o', full]);
    expect([r.code, r.stderr.trim().split('\n').length]).toEqual([2, 1]);
    expect(r.stderr).toMatch(/holds the variants of another --vary plan .*give --force/);
    expect(readFileSync(join(full, 'variants.json'), 'utf8')).toBe(before);
  });
});
