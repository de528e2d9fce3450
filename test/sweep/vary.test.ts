// --vary parsing: the KEY=A..B:N form of issue 6, keys and units from the scene schema. The
// expected values are those the spec states (N evenly spaced values, A and B included; units as in
// the scene file); the unit conversions are the SI definitions (1 kV = 1000 V, 1 mm = 1e-3 m).

import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { parseVary, grid, SweepError } from '../../sim/sweeps/vary.js';
import { parseRatios } from '../../sim/sweeps/sweep.js';
import { repoRoot } from '../bench/cbuild.js';

// The repository root from the sources or from dist/ (vitest may collect both).
const ROOT = repoRoot();

const TEXT = readFileSync(join(ROOT, 'scenes/qf4-peak-scan.yaml'), 'utf8');
const F = 'qf4-peak-scan.yaml';

describe('--vary KEY=A..B:N', () => {
  it('m/z: N points from A to B, one override per population', () => {
    const a = parseVary('mz=480..520:201', TEXT, F);
    expect(a.values.length).toBe(201);
    expect(a.values[0]).toBe(480);
    expect(a.values[200]).toBe(520);
    expect(a.values[1]).toBe(480.2); // printed as given, not 480.20000000000005
    expect(a.overrides(480.2)).toEqual(['ions.0.mz=480.2']);
  });

  it('scene keys with units: DC in V or kV, rod length in mm', () => {
    const dc = parseVary('stages.0.dc=95V..0.105kV:11', TEXT, F);
    expect(dc.values[0]).toBe(95);
    expect(dc.values[10]).toBe(105);
    expect(dc.values[1]).toBe(96);
    expect(dc.unit).toBe('V');
    expect(dc.overrides(96)).toEqual(['stages.0.dc=96 V']);
    const len = parseVary('stages.0.length=100mm..200 mm:3', TEXT, F);
    expect(len.values).toEqual([0.1, 0.15, 0.2]);
    expect(parseVary('ions.0.energy=2eV..8eV:4', TEXT, F).values).toEqual([2, 4, 6, 8]);
    expect(parseVary('stages.0.rf.amplitude=800V..860V:4', TEXT, F).values).toEqual([800, 820, 840, 860]);
  });

  it('bad input: one-line SweepError naming the flag', () => {
    const bad: [string, RegExp][] = [
      ['mz=480-520:201', /KEY=A\.\.B:N/],
      ['mz=480..520', /KEY=A\.\.B:N/],
      ['mz=480..520:1', /N must be at least 2/],
      ['stages.0.dcc=95V..105V:11', /unknown key 'stages\.0\.dcc'/],
      ['stages.7.dc=95V..105V:11', /no entry 7/],
      ['stages.0.dc=95mm..105mm:11', /expects a voltage/],
      ['stages.0.dc=95..105:11', /no unit/],
      ['mz=480V..520V:3', /plain number/],
      ['stages.0.rf=1..2:3', /not a numeric key/],
    ];
    for (const [spec, msg] of bad) {
      let err: unknown;
      try { parseVary(spec, TEXT, F); } catch (e) { err = e; }
      expect(err, spec).toBeInstanceOf(SweepError);
      expect((err as Error).message, spec).toMatch(msg);
      expect((err as Error).message.includes('\n'), spec).toBe(false);
    }
  });

  it('grid endpoints and scan-line ratios', () => {
    expect(grid(0, 1, 5)).toEqual([0, 0.25, 0.5, 0.75, 1]);
    expect(parseRatios('0.160..0.167:8')).toEqual([0.16, 0.161, 0.162, 0.163, 0.164, 0.165, 0.166, 0.167]);
    expect(() => parseRatios('0.16..0.17')).toThrow(SweepError);
    expect(() => parseRatios('0.16..0.9:3')).toThrow(/\[0, 0\.5\)/);
  });
});
