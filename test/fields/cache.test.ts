// The unit-solution cache (sim/fields/cache.ts): the same geometry and grid hit, whatever the
// voltages; a change of a shape, a hole or the grid misses; entries are whole.

import { describe, expect, it } from 'vitest';
import { readdirSync } from 'node:fs';
import { join } from 'node:path';
import { cacheKey, cacheRoot, solveCached } from '../../sim/fields/cache.js';
import type { FieldProblem, FieldSolution } from '../../sim/fields/problem.js';
import { tempDir } from '../helpers/temp.js';

const problem = (radius: number, dc = 10): FieldProblem => ({
  grid: { symmetry: 'axial', spacing: 1e-4, radius: 5e-3, length: 1e-2, mirror: [] },
  electrodes: [{ name: 'tube', potential: { dc, rf: 0, aux: 0 }, shapes: [{ kind: 'tube', innerRadius: radius, outerRadius: 5e-3, from: 0, to: 1e-2 }], holes: [] }],
});

// A synthetic solution: φ = ln(b/r)/ln(b/a) sampled on a few nodes (the coaxial closed form).
const fake = (): FieldSolution => ({
  grid: { symmetry: 'axial', origin: [0, 0, 0], spacing: 1e-4, shape: [3, 2, 1], mirror: [] },
  units: [Float64Array.from([1, 0.5, 0.25, 1, 0.5, 0.25])],
  inside: Int16Array.from([-1, -1, 0, -1, -1, 0]),
  stats: { iterations: [12], residual: [8e-11], contraction: [0.1], wallSeconds: 0.5, memoryBytes: 1000 },
});

describe('field cache', () => {
  it('hit on the same geometry (other voltages), miss on a changed shape or grid', async () => {
    const root = join(tempDir(), 'cache');
    let solves = 0;
    const solve = async () => { solves++; return fake(); };
    const a = await solveCached(problem(2e-3), 1e-10, root, solve);
    expect(a.hit).toBe(false);
    const b = await solveCached(problem(2e-3, -40), 1e-10, root, solve);
    expect(b.hit).toBe(true);
    expect(solves).toBe(1);
    expect([...b.solution.units[0]]).toEqual([...fake().units[0]]);
    expect([...b.solution.inside]).toEqual([...fake().inside]);
    expect(b.solution.stats.iterations).toEqual([12]);
    expect((await solveCached(problem(2.1e-3), 1e-10, root, solve)).hit).toBe(false);
    expect((await solveCached(problem(2e-3), 1e-8, root, solve)).hit).toBe(false);
    const g = problem(2e-3);
    expect(cacheKey({ ...g, grid: { ...g.grid, spacing: 5e-5 } }, 1e-10)).not.toBe(cacheKey(g, 1e-10));
    expect(solves).toBe(3);
    // Whole entries only: no partial folders left beside them.
    expect(readdirSync(root).filter((f) => f.includes('partial'))).toEqual([]);
    expect(readdirSync(root)).toHaveLength(3);
  });

  it('lives beside the output folder, else in $XDG_CACHE_HOME/iontrail, else ~/.cache/iontrail', () => {
    expect(cacheRoot('/data/fields')).toBe('/data/fields/.iontrail-cache');
    expect(cacheRoot(undefined, { XDG_CACHE_HOME: '/x' })).toBe('/x/iontrail');
    expect(cacheRoot(undefined, { HOME: '/h' })).toMatch(/\.cache\/iontrail$/);
  });
});
