// iontrail field end to end, as a user runs it: the folder written whole (or not at all), --json,
// --stage, --force, --at against a closed form, and the bad inputs of issue 12 (one line, exit 2,
// nothing written).
//
// Closed form: coaxial cylinders, inner radius a at V, outer radius b at 0 V,
// φ(r) = V ln(b/r) / ln(b/a), E_r = V / (r ln(b/a)) (Jackson, Classical Electrodynamics, 3rd ed.,
// §1.13, the coaxial capacitor). The drive: V = dc + rf × A cos(2π f T) with T = 1/(6f), so
// V = 10 V + 100 V × 0.5 = 60 V. Tolerances: the solver's discretisation error at b/32 is ≤ 2e-4 per
// volt (test/fields/coaxial.test.ts); the tricubic interpolation between nodes adds a few 1e-4 per
// volt, so 1e-3 × V for the potential; the field is a derivative, one order less accurate: 1 %.
import { afterAll, describe, expect, it } from 'vitest';
import { existsSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { iontrail, tempDir } from '../helpers/cli.js';
import { coaxStage as coaxStageYaml } from '../helpers/coax.js';

const dirs: string[] = [];
const temp = () => { const d = tempDir('iontrail-field-cli-'); dirs.push(d); return d; };
afterAll(() => { for (const d of dirs) rmSync(d, { recursive: true, force: true }); });

const a = 2e-3, b = 4e-3;

function coaxStage(innerDc: string, extra = ''): string {
  return `
${coaxStageYaml({ spacing: '0.125 mm', innerDc })}${extra}`;
}

function scene(stages: string): string {
  return `name: Skerry C-2 coaxial check
seed: 1
stages:${stages}
ions:
  - { mz: 100, count: 1, energy: 0.05 eV }
`;
}

function write(dir: string, name: string, text: string): string {
  const f = join(dir, name);
  writeFileSync(f, text);
  return f;
}

describe('iontrail field SCENE -o DIR', () => {
  it('writes the whole folder, --json names it, an existing folder needs --force', () => {
    const d = temp();
    const f = write(d, 'coax.yaml', scene(coaxStage('10 V')));
    const out = join(d, 'field');
    const r = iontrail(['field', f, '-o', out, '--json']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const s = JSON.parse(r.stdout);
    const files = readdirSync(out).sort();
    for (const want of ['summary.json', 'field.vti', 'unit-0-inner.npy', 'unit-0-inner.json', 'unit-1-outer.npy', 'unit-1-outer.json']) expect(files).toContain(want);
    expect(files.some((x) => x.endsWith('.png'))).toBe(true);
    // The printed summary is the one written.
    expect(JSON.parse(readFileSync(join(out, 'summary.json'), 'utf8'))).toEqual(s);
    expect(s.solve.final_residual.every((x: number) => x <= 1e-10)).toBe(true);
    // The coax is rotationally symmetric (φ depends on r alone, as ln r): every n ≥ 1 term of the
    // fit is zero but for discretisation error, ≤ 2e-4 per volt × 10 V dc plus fit noise: < 1e-2 V.
    for (const m of s.multipoles) if (m.n >= 1) expect(Math.hypot(m.cos_v, m.sin_v)).toBeLessThan(1e-2);
    // The .npy header is NumPy's magic.
    expect(readFileSync(join(out, 'unit-0-inner.npy')).subarray(0, 6).toString('latin1')).toBe('\x93NUMPY');

    const again = iontrail(['field', f, '-o', out]);
    expect(again.code).toBe(2);
    expect(again.stderr.trim().split('\n')).toHaveLength(1);
    expect(again.stderr).toContain('--force');
    const forced = iontrail(['field', f, '-o', out, '--force', '--json']);
    expect(forced.code).toBe(0);
    expect(JSON.parse(forced.stdout).solve.cache).toBe('hit');
    // No temporary folder left beside it: the scene, the folder and the solution cache only.
    expect(readdirSync(d).sort()).toEqual(['.iontrail-cache', 'coax.yaml', 'field']);
  });

  it('--stage N writes only that stage', () => {
    const d = temp();
    const f = write(d, 'two.yaml', scene(coaxStage('10 V') + coaxStage('0 V')));
    const out = join(d, 'one');
    const r = iontrail(['field', f, '-o', out, '--stage', '1', '--json']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const s = JSON.parse(r.stdout);
    expect(s.stage).toBe(1);
    expect(s.electrodes[0].dc_v).toBe(0);
    expect(existsSync(join(out, 'summary.json'))).toBe(true);
  });
});

describe('iontrail field SCENE --at X,Y,Z --time T --json', () => {
  it('matches the coaxial closed form with the dc + rf drive at time T', () => {
    const d = temp(), cache = temp();
    const f = write(d, 'coax.yaml', scene(coaxStage('10 V')));
    const T = 1 / 6e6;
    // --at caches under $XDG_CACHE_HOME/iontrail: a temp folder here, not the user's.
    const before = process.env.XDG_CACHE_HOME;
    process.env.XDG_CACHE_HOME = cache;
    const pts = [[3e-3, 0], [2.2e-3, 1.6e-3], [0, -3.7e-3]];
    const r = iontrail(['field', f, ...pts.flatMap(([x, y]) => ['--at', `${x * 1e3}mm,${y * 1e3}mm,5mm`]), '--time', `${T}s`, '--json']);
    if (before === undefined) delete process.env.XDG_CACHE_HOME; else process.env.XDG_CACHE_HOME = before;
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const rows = JSON.parse(r.stdout);
    const V = 10 + 100 * Math.cos(2 * Math.PI * 1e6 * T);
    expect(V).toBeCloseTo(60, 9);
    expect(rows).toHaveLength(3);
    pts.forEach(([x, y], i) => {
      const rr = Math.hypot(x, y), row = rows[i];
      expect(Math.abs(row.potential_v - V * Math.log(b / rr) / Math.log(b / a))).toBeLessThanOrEqual(1e-3 * V);
      const er = V / (rr * Math.log(b / a));
      expect(Math.abs(row.e_x - er * x / rr)).toBeLessThanOrEqual(0.01 * er);
      expect(Math.abs(row.e_y - er * y / rr)).toBeLessThanOrEqual(0.01 * er);
      expect(Math.abs(row.e_z)).toBeLessThanOrEqual(1e-3 * er);
    });
    expect(readdirSync(d)).toEqual(['coax.yaml']);
    expect(readdirSync(cache)).toEqual(['iontrail']);
  });
});

describe('iontrail field: bad input is one line, exit 2, nothing written', () => {
  const cases: [string, string, RegExp][] = [
    ['overlapping electrodes at different potentials', coaxStage('10 V').replace("- circle: { center: [0 mm, 0 mm], radius: 2 mm }", "- circle: { center: [0 mm, 0 mm], radius: 2 mm }\n          - circle: { center: [3 mm, 0 mm], radius: 1.5 mm }"), /overlaps electrode/],
    ['a shape outside the grid', coaxStage('10 V').replace("- circle: { center: [0 mm, 0 mm], radius: 2 mm }", "- circle: { center: [0 mm, 0 mm], radius: 2 mm }\n          - circle: { center: [30 mm, 0 mm], radius: 1 mm }"), /outside the grid/],
    ['a feature narrower than three cells', coaxStage('10 V').replace("- circle: { center: [0 mm, 0 mm], radius: 2 mm }", "- circle: { center: [0 mm, 0 mm], radius: 2 mm }\n          - rectangle: { min: [2.5 mm, -1 mm], max: [2.7 mm, 1 mm] }"), /narrower than three cells.*use a spacing of at most/],
    ['a grid larger than free memory', coaxStage('10 V').replace('spacing: 0.125 mm', 'spacing: 0.0001 mm'), /needs about .* more than the .* of free memory/],
    // One multigrid-preconditioned BiCGSTAB iteration leaves a residual far above 1e-10 (the
    // coaxial grid takes five), so a limit of 1 cannot converge.
    ['a solve that does not converge', coaxStage('10 V').replace('mirror: [x, y] }', 'mirror: [x, y], max_iterations: 1 }'), /grid\.max_iterations: .*did not converge: relative residual .* after 1 iterations.*raise it/],
  ];
  for (const [what, stage, msg] of cases) {
    it(what, () => {
      const d = temp();
      const f = write(d, 'bad.yaml', scene(stage));
      const r = iontrail(['field', f, '-o', join(d, 'out')]);
      expect(r.code).toBe(2);
      const lines = r.stderr.trim().split('\n');
      expect(lines).toHaveLength(1);
      expect(lines[0]).toMatch(msg);
      expect(lines[0]).toMatch(/bad\.yaml:\d+/);
      expect(readdirSync(d)).toEqual(['bad.yaml']);
    });
  }
});
