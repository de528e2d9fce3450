// Sweep sizes: a sweep above MAX_POINTS is refused up front with one line and nothing written;
// a sweep at the limit runs to the end (no call spreads its points into arguments, which
// overflows V8's call stack somewhere above ~10⁵ values; the stack limit is V8's, not a source).

import { afterAll, describe, expect, it } from 'vitest';
import { readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { iontrail, tempDir } from '../helpers/cli.js';
import { MAX_POINTS } from '../../sim/sweeps/vary.js';
import { ionCount } from '../../cli/commands/sweep.js';

const dirs: string[] = [];
const temp = () => { const d = tempDir('iontrail-sweep-limits-'); dirs.push(d); return d; };
afterAll(() => { for (const d of dirs) rmSync(d, { recursive: true, force: true }); });

const SCENE = `
name: Skerry QF-4 sweep size check
stages:
  - { type: quadrupole, length: 150 mm, r0: 4 mm, rf: { amplitude: 832 V, frequency: 1.2 MHz }, dc: 138.3 V }
ions:
  - { mz: 502, count: 1, position: { spread: 0.1 mm }, energy: 5 eV }
run: { steps_per_cycle: 40, max_time: 300 us, record_every: 0 }
`;

describe('sweep size', () => {
  it('refuses --vary mz=490..514:1000000 with one line, writing nothing', () => {
    const d = temp();
    writeFileSync(join(d, 's.yaml'), SCENE);
    const r = iontrail(['sweep', join(d, 's.yaml'), '--vary', 'mz=490..514:1000000', '-o', join(d, 'out')]);
    expect(r.code).toBe(2);
    expect(r.stderr.trim()).toBe(`iontrail sweep: --vary mz: N = 1000000 exceeds ${MAX_POINTS} points per sweep; split the range into several sweeps`);
    expect(readdirSync(d)).toEqual(['s.yaml']);
  });

  it('refuses a map and scan lines whose product exceeds the limit', () => {
    const d = temp();
    writeFileSync(join(d, 's.yaml'), SCENE);
    const map = iontrail(['sweep', join(d, 's.yaml'), '--vary', 'mz=490..514:1000', '--vary', 'stages.0.dc=130V..140V:1000', '-o', join(d, 'out')]);
    expect(map.code).toBe(2);
    expect(map.stderr.trim()).toBe(`iontrail sweep: the sweep has 1000000 points; at most ${MAX_POINTS}`);
    const lines = iontrail(['sweep', join(d, 's.yaml'), '--vary', 'mz=490..514:20000', '--scan-lines', '0.160..0.167:8', '-o', join(d, 'out')]);
    expect(lines.code).toBe(2);
    expect(lines.stderr.trim()).toMatch(/^iontrail sweep: the sweep and its 8 scan lines have 180000 points; at most 100000$/);
    expect(readdirSync(d)).toEqual(['s.yaml']);
  });

  it(`runs a sweep of exactly ${MAX_POINTS} points to the end`, () => {
    const d = temp();
    writeFileSync(join(d, 's.yaml'), SCENE);
    const r = iontrail(['sweep', join(d, 's.yaml'), '--vary', `mz=490..514:${MAX_POINTS}`, '--method', 'matrix', '-o', join(d, 'out')]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toMatch(new RegExp(`${MAX_POINTS} points × 1 ions`));
    expect(readFileSync(join(d, 'out', 'sweep.csv'), 'utf8').trim().split('\n')).toHaveLength(MAX_POINTS + 1);
    expect(JSON.parse(readFileSync(join(d, 'out', 'summary.json'), 'utf8')).complete).toBe(true);
  }, 120_000);

  it('ionCount takes a million totals', () => {
    const totals = new Array<number>(1_000_000).fill(2000);
    expect(ionCount(totals)).toBe('2000');
    totals[777] = 40;
    expect(ionCount(totals)).toBe('40–2000');
  });
});
