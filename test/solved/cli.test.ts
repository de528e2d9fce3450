// iontrail run with a solved stage, as a user meets it: the field solved on first use and read
// from the cache after, --no-solve refusing a field not yet solved, a layout whose potentials jump
// where a solved stage meets the stage before it refused with both values, ions born inside an
// electrode counted lost with one warning, a step too coarse for the grid warned about. Each bad
// input: one line, exit 2, nothing written.

import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { roundRodStage } from '../helpers/round-rods.js';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { iontrail, tempDir } from '../helpers/cli.js';
import { privateFieldCache } from './helpers.js';

const tubes = (v1: string, v2: string) => `    grid: { symmetry: axial, spacing: 0.2 mm, radius: 5 mm }
    electrodes:
      - name: tube 1
        potential: { dc: ${v1} }
        shapes: [ { tube: { inner_radius: 3 mm, outer_radius: 4 mm, from: 0 mm, to: 14 mm } } ]
      - name: tube 2
        potential: { dc: ${v2} }
        shapes: [ { tube: { inner_radius: 3 mm, outer_radius: 4 mm, from: 16 mm, to: 30 mm } } ]`;

const LENS = (ions: string, run = 'run: { max_time: 20 us, step_without_rf: 2 ns }') => `name: Skerry lens CLI check
stages:
  - type: electrodes
    length: 30 mm
${tubes('0 V', '-50 V')}
ions:
${ions}
${run}
`;

let dir: string;
beforeAll(() => { privateFieldCache(); dir = tempDir(); });

function write(name: string, text: string): string {
  const p = join(dir, name);
  writeFileSync(p, text);
  return p;
}

describe('iontrail run through a solved field', () => {
  it('--no-solve refuses a field not in the cache; without it the field is solved, then read back', () => {
    const f = write('lens.yaml', LENS('  - { mz: 100, count: 4, energy: 10 eV }'));
    const out = join(dir, 'r1');
    const refused = iontrail(['run', f, '-o', out, '--no-solve']);
    expect(refused.code).toBe(2);
    expect(refused.stderr.trim().split('\n')).toHaveLength(1);
    expect(refused.stderr).toMatch(/stages\.0: the electrode field of this stage is not solved .*--no-solve/);
    expect(existsSync(out)).toBe(false);
    const first = iontrail(['run', f, '-o', out, '--json']);
    expect(first.code).toBe(0);
    expect(first.stderr).toMatch(/solving the electrode field of stage 0/);
    const s = JSON.parse(first.stdout);
    expect(s.species[0].detected).toBe(4);
    expect(s.provenance.scene.stages[0].field_path.path).toBe('interpolated grid');
    // Now cached: --no-solve runs, and solves nothing.
    const again = iontrail(['run', f, '-o', join(dir, 'r2'), '--no-solve', '--json']);
    expect(again.code).toBe(0);
    expect(again.stderr).not.toMatch(/solving/);
    expect(readFileSync(join(dir, 'r2', 'ions.arrow'))).toEqual(readFileSync(join(out, 'ions.arrow')));
  }, 120_000);

  it('refuses a solved stage whose axis potential at its entrance differs from where the stage before ends', () => {
    // The grounded box face at the entrance of an axial grid holds the axis at 0 V there, while the
    // accelerating gap before it leaves the ions 40 V lower: an ion would jump by 40 V.
    const f = write('jump.yaml', `name: Skerry jump check
stages:
  - { type: accelerate, length: 10 mm, voltage: 40 V }
  - type: electrodes
    length: 30 mm
${tubes('-40 V', '-40 V')}
ions:
  - { mz: 100, count: 1, energy: 10 eV }
run: { max_time: 20 us, step_without_rf: 2 ns }
`);
    const out = join(dir, 'jump');
    const r = iontrail(['run', f, '-o', out]);
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/stages\.1: the potential on the axis at this stage's entrance \(z = 10\.000 mm\) is 0\.00000 V from its electrodes but -40\.0000 V where the stage before it \(accelerat/);
    expect(existsSync(out)).toBe(false);
  }, 120_000);

  it('ions born inside an electrode are lost at once, with one warning that counts them', () => {
    // Half the cloud starts in the wall of tube 1 (r from 3 to 4 mm at x = 3.5 mm ± 0.1 mm).
    const f = write('inside.yaml', LENS('  - { mz: 100, count: 6, energy: 10 eV, position: { x: 3.5 mm, z: 5 mm, spread: 0.05 mm } }\n  - { mz: 100, count: 6, energy: 10 eV }'));
    const r = iontrail(['run', f, '-o', join(dir, 'inside'), '--json']);
    expect(r.code).toBe(0);
    const s = JSON.parse(r.stdout);
    const w = (s.warnings as string[]).filter((x) => /start inside an electrode/.test(x));
    expect(w).toEqual(['stages.0: 6 of 12 ions start inside an electrode or beyond the grid of this stage; they are counted as hit at t = 0']);
    expect(s.species[0].hit).toBe(6);
  }, 120_000);

  it('warns when the step can carry an ion across more than one grid cell', () => {
    const f = write('coarse.yaml', LENS('  - { mz: 100, count: 1, energy: 10 eV }', 'run: { max_time: 20 us, step_without_rf: 50 ns }'));
    const r = iontrail(['run', f, '-o', join(dir, 'coarse'), '--json']);
    expect(r.code).toBe(0);
    const s = JSON.parse(r.stdout);
    // 10 eV + the axis potential's fall (just under 50 V: the tube's −50 V does not quite reach the
    // axis) at m/z 100: 10.7 km/s, 0.54 mm per 50 ns step, 2.68 cells of 0.2 mm.
    expect((s.warnings as string[]).some((x) => /stages\.0: the step \(50 ns\) may carry the fastest ion \(10\.7 km\/s\) across 2\.68 grid cells of 0\.2 mm/.test(x))).toBe(true);
  }, 120_000);

  it('does not warn about the fixed step under integrator: dopri5, which does not take it', () => {
    const f = write('coarse-dopri5.yaml', LENS('  - { mz: 100, count: 1, energy: 10 eV }', 'run: { integrator: dopri5, tolerance: 1e-9, max_time: 20 us, step_without_rf: 50 ns }'));
    const r = iontrail(['run', f, '-o', join(dir, 'coarse-dopri5'), '--json']);
    expect(r.code).toBe(0);
    const s = JSON.parse(r.stdout);
    expect((s.warnings as string[]).filter((x) => /grid cells/.test(x))).toEqual([]);
    // The same ion as above: 10 eV on the axis leaves the 30 mm lens forward within 20 µs (detected after it, as the four of the first run).
    expect(s.species[0].detected).toBe(1);
  }, 120_000);

  it('sweep --vary mz through a solved rod set gives the same points with 1 and 2 workers', () => {
    const f = write('rods.yaml', `name: Skerry rod set sweep check
seed: 5
stages:
${roundRodStage({ length: '60 mm', spacing: '0.1 mm', dc: '138.3 V', rf: '{ amplitude: 832 V, frequency: 1.2 MHz }' })}ions:
  - { mz: 502, count: 30, energy: 5 eV, position: { spread: 0.1 mm }, angle_spread: 1 deg }
`);
    const csv = (w: string) => {
      const out = join(dir, `sweep-w${w}`);
      const r = iontrail(['sweep', f, '--vary', 'mz=490..510:3', '-o', out, '--workers', w]);
      expect(r.code, r.stderr).toBe(0);
      return readFileSync(join(out, 'sweep.csv'), 'utf8');
    };
    const one = csv('1');
    expect(one.trim().split('\n')).toHaveLength(4);
    expect(csv('2')).toBe(one);
  }, 120_000);
});
