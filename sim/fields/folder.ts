// The files of a field folder (`iontrail field`): per electrode its unit solution as float32 .npy
// with a .json of the same name beside it (grid origin, spacing, shape and axis order), one .vti
// with every unit solution as a point array, and summary.json. Written into a folder the caller
// moves into place whole (sim/core/atomic.ts).

import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { encodeNpy } from './npy.js';
import { encodeVti } from './vti.js';
import type { FieldProblem, FieldSolution, SolvedGrid } from './problem.js';

/** A file-name-safe form of an electrode's name. */
export function fileStem(k: number, name: string): string {
  return `unit-${k}-${name.replace(/[^A-Za-z0-9._-]+/g, '_').replace(/^_+|_+$/g, '') || 'electrode'}`;
}

/** C-order shape and axis names of a grid's arrays (the first index varies slowest). */
export function npyLayout(g: SolvedGrid): { shape: number[]; axes: string[] } {
  const [n0, n1, n2] = g.shape;
  if (g.symmetry === 'planar') return { shape: [n1, n0], axes: ['y', 'x'] };
  if (g.symmetry === 'axial') return { shape: [n1, n0], axes: ['z', 'r'] };
  return { shape: [n2, n1, n0], axes: ['z', 'y', 'x'] };
}

/** The grid block of summary.json and of each .npy's .json. */
export function gridJson(g: SolvedGrid): Record<string, unknown> {
  const { shape, axes } = npyLayout(g);
  const names = g.symmetry === 'axial' ? ['r', 'z', '-'] : ['x', 'y', 'z'];
  return {
    symmetry: g.symmetry,
    spacing_m: g.spacing,
    origin_m: Object.fromEntries(names.slice(0, g.symmetry === 'none' ? 3 : 2).map((n, i) => [n, g.origin[i]])),
    nodes: Object.fromEntries(names.slice(0, g.symmetry === 'none' ? 3 : 2).map((n, i) => [n, g.shape[i]])),
    npy_shape: shape,
    npy_axes: axes,
    mirror: g.mirror,
    node_count: g.shape[0] * g.shape[1] * g.shape[2],
  };
}

/** Volts on each electrode at time t: dc + rf × V cos(Ωt + φ) (the stage's RF drive, if any). */
export function voltsAt(problem: FieldProblem, rf: { amplitude: number; frequency: number; phase: number } | undefined, t: number): number[] {
  const drive = rf ? rf.amplitude * Math.cos(2 * Math.PI * rf.frequency * t + rf.phase) : 0;
  return problem.electrodes.map((e) => e.potential.dc + e.potential.rf * drive);
}

/** Write the unit solutions (.npy + .json) and the .vti into `dir`; the file names written. */
export function writeFieldFiles(dir: string, problem: FieldProblem, sol: FieldSolution, vtiName: string): string[] {
  const files: string[] = [];
  const { shape, axes } = npyLayout(sol.grid);
  const grid = gridJson(sol.grid);
  problem.electrodes.forEach((e, k) => {
    const stem = fileStem(k, e.name);
    writeFileSync(join(dir, `${stem}.npy`), encodeNpy(sol.units[k], shape));
    writeFileSync(join(dir, `${stem}.json`), JSON.stringify({
      electrode: e.name, meaning: 'unit solution: this electrode at 1 V, every other electrode and the grounded box edge at 0 V (V per V)',
      dtype: 'float32 little-endian', npy_shape: shape, npy_axes: axes, grid,
    }, null, 2) + '\n');
    files.push(`${stem}.npy`, `${stem}.json`);
  });
  writeFileSync(join(dir, vtiName), encodeVti(sol.grid, problem.electrodes.map((e, k) => ({ name: e.name, values: sol.units[k] }))));
  files.push(vtiName);
  return files;
}
