// The shape of the house (issue "One home per stage kind"): no import cycles, imports run down the
// floors (at most one exception), and only sim/stages names a stage kind in a switch or a test.
// Common practice for layered code, no source; the floors are in floors.ts.
import { describe, it, expect } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { repoRoot } from '../bench/cbuild.js';
import { findCycle, importGraph, sourceFiles } from './imports.js';
import { floorOf } from './floors.js';
import { STAGE_ENTRIES, STAGE_TYPES } from '../../sim/stages/registry.js';

describe('the house', () => {
  const graph = importGraph();

  it('has a floor for every source file', () => {
    const without = [...graph.keys()].filter((f) => floorOf(f) === undefined);
    expect(without).toEqual([]);
  });

  it('has no import cycle', () => {
    expect(findCycle(graph)).toBeNull();
  });

  it('has at most one import that runs up a floor', () => {
    const up: string[] = [];
    for (const [f, deps] of graph) for (const d of deps) {
      const a = floorOf(f), b = floorOf(d);
      if (a !== undefined && b !== undefined && b > a) up.push(`${f} (floor ${a}) imports ${d} (floor ${b})`);
    }
    expect(up.length, up.join('\n')).toBeLessThanOrEqual(1);
  });

  const names = [...new Set([...STAGE_TYPES, ...STAGE_ENTRIES.keys()])].join('|');
  const pattern = new RegExp(`(?:type\\s*[!=]==?\\s*['"](?:${names})['"])|(?:case\\s+['"](?:${names})['"])`);

  it('names stage kinds in switches and comparisons only inside sim/stages', () => {
    const offenders = sourceFiles().filter((f) => !f.startsWith('sim/stages/'))
      .filter((f) => pattern.test(readFileSync(join(repoRoot(), f), 'utf8')));
    expect(offenders).toEqual([]);
  });

  it('would see a stage switch or a cycle (the checks above can fail)', () => {
    expect(pattern.test("if (st.type === 'quadrupole') return;")).toBe(true);
    expect(pattern.test("switch (s.type) { case 'reflectron': break; }")).toBe(true);
    expect(pattern.test("if (s.type !== 'drift') return;")).toBe(true);
    expect(pattern.test("const kind = kindOf(st);")).toBe(false);
    expect(findCycle(new Map([['a.ts', ['b.ts']], ['b.ts', ['c.ts']], ['c.ts', ['a.ts']]]))).toEqual(['a.ts', 'b.ts', 'c.ts', 'a.ts']);
    expect(floorOf('sim/engine/track.ts')).toBeLessThan(floorOf('sim/analysis/peak.ts')!);
  });
});
