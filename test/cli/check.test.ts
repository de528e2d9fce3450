// End-to-end: `node cli/iontrail.js check …` (interface fixed by issue 2).
import { describe, it, expect, beforeAll } from 'vitest';
import { spawnSync } from 'node:child_process';
import { existsSync, statSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { repoRoot } from '../bench/cbuild.js';

const root = repoRoot();

function newestSource(): number {
  const files = [join(root, 'cli/commands/check.ts'), ...readdirSync(join(root, 'sim/mathieu')).map((f) => join(root, 'sim/mathieu', f))];
  return Math.max(...files.map((f) => statSync(f).mtimeMs));
}

beforeAll(() => {
  // `npm test` builds first; when this file runs alone, rebuild if dist/ is missing or stale.
  const built = join(root, 'dist/cli/commands/check.js');
  if (!existsSync(built) || statSync(built).mtimeMs < newestSource()) {
    spawnSync(process.execPath, [join(root, 'node_modules/typescript/bin/tsc'), '-p', root], { cwd: root, stdio: 'ignore' });
  }
  expect(existsSync(built)).toBe(true);
});

function check(...args: string[]) {
  const r = spawnSync(process.execPath, [join(root, 'cli/iontrail.js'), 'check', ...args], { cwd: root, encoding: 'utf8' });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

const QUAD = ['--analyzer', 'quadrupole', '--r0', '4mm', '--freq', '1.2MHz', '--rf', '600V'];
const TRAP = ['--analyzer', 'trap', '--r0', '7.07mm', '--freq', '1.05MHz', '--rf', '400V'];

describe('iontrail check --json', () => {
  it('quadrupole: a, q, beta, secular frequencies keyed x/y, stable, mz_window', () => {
    const r = check(...QUAD, '--dc', '100V', '--mz', '502', '--json');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.analyzer).toBe('quadrupole');
    expect(j.mz).toBe(502);
    expect(j.charge).toBe(1);
    expect(Object.keys(j.a).sort()).toEqual(['x', 'y']);
    expect(Object.keys(j.q).sort()).toEqual(['x', 'y']);
    expect(j.a.y).toBe(-j.a.x);
    expect(j.q.x).toBeGreaterThan(0.5); // q = 4eV/(m r0² Ω²) ≈ 0.507 for these inputs
    expect(j.q.x).toBeLessThan(0.51);
    expect(typeof j.stable).toBe('boolean');
    // a = 0.169 at q = 0.507 lies above the y edge −a0(0.507) ≈ 0.125: y unstable (A&S Table 20.1).
    expect(j.stable).toBe(false);
    expect(j.beta.y).toBeNull();
    expect(j.secular_frequency_hz.y).toBeNull();
    // No well on an unstable axis: null, as the text table says "none" (it was −23.9 V, the
    // formula's number for a + q²/2 < 0, before issue 11).
    expect(j.well_depth_v.y).toBeNull();
    expect(j.well_depth_v.x).toBeGreaterThan(0);
    expect(check(...QUAD, '--dc', '100V', '--mz', '502').out).toMatch(/^y .* none$/m);
    expect(j.beta.x).toBeGreaterThan(0);
    expect(j.secular_frequency_hz.x).toBeCloseTo((j.beta.x * 1.2e6) / 2, 3);
    expect(j.mz_window.low).toBeLessThan(j.mz_window.high);
  });

  it('trap: keys z/r, lmco_mz, z0 defaults to r0/√2', () => {
    const r = check(...TRAP, '--mz', '609', '--json');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.analyzer).toBe('trap');
    expect(Object.keys(j.beta).sort()).toEqual(['r', 'z']);
    expect(j.stable).toBe(true);
    expect(j.beta.z).toBeGreaterThan(0);
    expect(j.secular_frequency_hz.r).toBeGreaterThan(0);
    expect(typeof j.lmco_mz).toBe('number');
    const explicit = JSON.parse(check(...TRAP, '--z0', `${7.07 / Math.SQRT2}mm`, '--mz', '609', '--json').out);
    expect(explicit.q.z).toBeCloseTo(j.q.z, 12);
    expect(j.inputs.z0_m).toBeCloseTo(7.07e-3 / Math.SQRT2, 15);
  });

  it('a comma list of m/z gives a JSON array, one object per value in order', () => {
    const r = check(...TRAP, '--mz', '609,100,50', '--json');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    expect(Array.isArray(j)).toBe(true);
    expect(j.map((o: { mz: number }) => o.mz)).toEqual([609, 100, 50]);
    expect(j[2].stable).toBe(false); // m/z 50 is below the cut-off (≈ 78)
  });

  it('--dc 100V and --dc=100V are the same; so are --dc -12V and --dc=-12V', () => {
    const a = check(...QUAD, '--dc', '100V', '--mz', '360', '--json');
    const b = check(...QUAD, '--dc=100V', '--mz', '360', '--json');
    expect(a.code).toBe(0);
    expect(b.out).toBe(a.out);
    const c = check(...QUAD, '--dc', '-12V', '--mz', '502', '--json');
    const d = check(...QUAD, '--dc=-12V', '--mz', '502', '--json');
    expect(c.code).toBe(0);
    expect(d.out).toBe(c.out);
    expect(JSON.parse(c.out).a.x).toBeLessThan(0);
  });

  it('--rf-max reports the highest m/z (about 3000 for 5 kV; common practice, no source)', () => {
    const j = JSON.parse(check(...QUAD, '--mz', '502', '--rf-max', '5kV', '--json').out);
    expect(j.mz_max).toBeGreaterThan(2800);
    expect(j.mz_max).toBeLessThan(3200);
  });
});

describe('iontrail check, human output', () => {
  it('prints an aligned table with units and a one-line verdict', () => {
    const r = check(...TRAP, '--mz', '609');
    expect(r.code).toBe(0);
    const lines = r.out.split('\n');
    const head = lines.findIndex((l) => l.startsWith('axis'));
    expect(head).toBeGreaterThan(0);
    expect(lines[head + 1].startsWith('z')).toBe(true);
    expect(lines[head + 2].startsWith('r')).toBe(true);
    expect(lines[head + 1].length).toBe(lines[head + 2].length); // columns aligned
    expect(r.out).toMatch(/kHz/);
    expect(lines.filter((l) => l.startsWith('verdict:')).length).toBe(1);
    expect(r.out).toMatch(/low-mass cut-off/);
  });
});

describe('iontrail check, bad input: one line on stderr, exit 2, nothing on stdout', () => {
  const cases: [string, string[], RegExp][] = [
    ['missing --rf', ['--analyzer', 'trap', '--r0', '7mm', '--freq', '1MHz', '--mz', '609'], /--rf/],
    ['missing --mz', [...TRAP], /--mz/],
    ['wrong unit for --rf', ['--analyzer', 'trap', '--r0', '7mm', '--freq', '1MHz', '--rf', '4mm', '--mz', '609'], /--rf expects a voltage/],
    ['unknown unit', [...TRAP.slice(0, 4), '--freq', '1.05MHzz', '--rf', '400V', '--mz', '609'], /--freq/],
    ['negative r0', ['--analyzer', 'trap', '--r0', '-7mm', '--freq', '1MHz', '--rf', '400V', '--mz', '609'], /--r0/],
    ['zero frequency', ['--analyzer', 'trap', '--r0', '7mm', '--freq', '0Hz', '--rf', '400V', '--mz', '609'], /--freq/],
    ['zero m/z', [...TRAP, '--mz', '0'], /--mz/],
    ['negative m/z in a list', [...TRAP, '--mz', '609,-5'], /--mz/],
    ['non-numeric charge', [...TRAP, '--mz', '609', '--charge', 'two'], /--charge/],
    ['zero charge', [...TRAP, '--mz', '609', '--charge', '0'], /--charge/],
    ['unknown analyzer', ['--analyzer', 'trapp', '--r0', '7mm', '--freq', '1MHz', '--rf', '400V', '--mz', '609'], /--analyzer/],
    ['unknown flag', [...TRAP, '--mz', '609', '--rff', '3'], /--rff/],
  ];
  for (const [name, args, pattern] of cases) {
    it(name, () => {
      const r = check(...args);
      expect(r.code).toBe(2);
      expect(r.out).toBe('');
      const lines = r.err.trimEnd().split('\n');
      expect(lines.length).toBe(1);
      expect(lines[0]).toMatch(pattern);
      expect(r.err).not.toMatch(/\n\s+at /); // no stack trace
    });
  }
});
