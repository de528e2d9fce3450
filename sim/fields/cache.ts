// Solved unit solutions, kept on disk by a hash of what they depend on: the grid and every
// electrode's shapes and holes in order (not the voltages: a unit solution holds one electrode at
// 1 V and the others at 0 V), and the solver's tolerance. A repeated solve of the same geometry,
// whatever its voltages, reads the cache instead. Entries are folders written whole
// (sim/core/atomic.ts): a half-written entry never exists under its final name.

import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { homedir } from 'node:os';
import { join } from 'node:path';
import { folderBeside, swapFolderIntoPlace } from '../core/atomic.js';
import type { FieldProblem, FieldSolution, SolvedGrid, SolveStats } from './problem.js';

/** Bumped when the solver's discretisation changes, so old entries are no longer found. */
export const CACHE_FORMAT = 'iontrail-field-cache-2';

/** What the solution depends on, as canonical JSON (object keys sorted). */
function canonical(v: unknown): string {
  if (Array.isArray(v)) return `[${v.map(canonical).join(',')}]`;
  if (v !== null && typeof v === 'object') {
    const o = v as Record<string, unknown>;
    return `{${Object.keys(o).sort().filter((k) => o[k] !== undefined).map((k) => `${JSON.stringify(k)}:${canonical(o[k])}`).join(',')}}`;
  }
  return JSON.stringify(v);
}

/** The cache key of a problem solved to `tolerance`: hex SHA-256. */
export function cacheKey(problem: FieldProblem, tolerance: number): string {
  // The iteration limit decides only whether a solve is accepted, not what a converged one holds.
  const { maxIterations: _limit, ...grid } = problem.grid;
  const geometry = { format: CACHE_FORMAT, tolerance, grid, electrodes: problem.electrodes.map((e) => ({ shapes: e.shapes, holes: e.holes })) };
  return createHash('sha256').update(canonical(geometry)).digest('hex');
}

/**
 * The cache folder: `.iontrail-cache` beside the output folder when there is one, else
 * $XDG_CACHE_HOME/iontrail, else ~/.cache/iontrail.
 */
export function cacheRoot(outParent?: string, env: NodeJS.ProcessEnv = process.env): string {
  if (outParent !== undefined) return join(outParent, '.iontrail-cache');
  const xdg = env.XDG_CACHE_HOME;
  return xdg ? join(xdg, 'iontrail') : join(homedir(), '.cache', 'iontrail');
}

interface Meta {
  format: string;
  grid: SolvedGrid;
  stats: SolveStats;
  units: number;
  nodes: number;
}

/** The cached solution of `key`, or undefined (missing or unreadable entries count as misses). */
export function readCached(root: string, key: string): FieldSolution | undefined {
  const dir = join(root, key);
  try {
    const meta = JSON.parse(readFileSync(join(dir, 'meta.json'), 'utf8')) as Meta;
    if (meta.format !== CACHE_FORMAT) return undefined;
    const units: Float64Array[] = [];
    for (let k = 0; k < meta.units; k++) {
      const b = readFileSync(join(dir, `unit-${k}.f64`));
      if (b.byteLength !== 8 * meta.nodes) return undefined;
      units.push(new Float64Array(b.buffer.slice(b.byteOffset, b.byteOffset + b.byteLength)));
    }
    const ib = readFileSync(join(dir, 'inside.i16'));
    if (ib.byteLength !== 2 * meta.nodes) return undefined;
    const inside = new Int16Array(ib.buffer.slice(ib.byteOffset, ib.byteOffset + ib.byteLength));
    return { grid: meta.grid, units, inside, stats: meta.stats };
  } catch {
    return undefined;
  }
}

/** Store a solution under `key` (whole or not at all); a failure to write is not an error of the solve. */
export function writeCached(root: string, key: string, sol: FieldSolution): boolean {
  let temp: string | undefined;
  try {
    mkdirSync(root, { recursive: true });
    const dir = join(root, key);
    if (existsSync(dir)) return true;
    temp = folderBeside(dir);
    const meta: Meta = { format: CACHE_FORMAT, grid: sol.grid, stats: sol.stats, units: sol.units.length, nodes: sol.inside.length };
    sol.units.forEach((u, k) => writeFileSync(join(temp!, `unit-${k}.f64`), new Uint8Array(u.buffer, u.byteOffset, u.byteLength)));
    writeFileSync(join(temp, 'inside.i16'), new Uint8Array(sol.inside.buffer, sol.inside.byteOffset, sol.inside.byteLength));
    writeFileSync(join(temp, 'meta.json'), JSON.stringify(meta));
    swapFolderIntoPlace(temp, dir, false);
    rmSync(temp, { recursive: true, force: true });
    return true;
  } catch {
    if (temp) rmSync(temp, { recursive: true, force: true });
    return false;
  }
}

/** Solve through the cache: `hit` says whether the stored solution served. */
export async function solveCached(problem: FieldProblem, tolerance: number, root: string,
  solve: () => Promise<FieldSolution>): Promise<{ solution: FieldSolution; hit: boolean; key: string }> {
  const key = cacheKey(problem, tolerance);
  const found = readCached(root, key);
  if (found) return { solution: found, hit: true, key };
  const solution = await solve();
  writeCached(root, key, solution);
  return { solution, hit: false, key };
}
