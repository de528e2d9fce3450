// Provenance prints only the integrator settings that apply (issue 11: a fixed-step RK4 run read
// "tolerance undefined"). The rule is the project's own (DESIGN.md: provenance carries the
// integrator and step settings): RK4 has no tolerance; Dormand–Prince 5(4) has one, the one asked for.

import { afterAll, describe, expect, it } from 'vitest';
import { readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { iontrail, tempDir } from '../helpers/cli.js';

const tmp = tempDir('iontrail-provenance-');
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

// 50 ions: the test needs the provenance lines only, not the figures of merit.
function report(name: string, ...set: string[]): { md: string; integrator: Record<string, unknown> } {
  const out = join(tmp, name);
  const r = iontrail(['report', 'scenes/qf4-compact-filter.yaml', '-o', out, '--set', 'ions.0.count=50', ...set.flatMap((s) => ['--set', s])]);
  expect(r.code, r.stderr).toBe(0);
  const results = JSON.parse(readFileSync(join(out, 'results.json'), 'utf8'));
  return { md: readFileSync(join(out, 'report.md'), 'utf8'), integrator: results.provenance.integrator };
}

describe('integrator provenance', () => {
  it('rk4: method and step settings, no tolerance, nothing undefined', () => {
    const { md, integrator } = report('rk4');
    const line = md.split('\n').find((l) => l.startsWith('| integrator'))!;
    expect(line).toContain('method rk4');
    expect(line).not.toMatch(/tolerance|undefined|NaN|null/);
    expect(md).not.toMatch(/\bundefined\b/);
    expect('tolerance' in integrator).toBe(false);
  });

  it('dopri5: the tolerance asked for', () => {
    const { md, integrator } = report('dopri5', 'run.integrator=dopri5', 'run.tolerance=1e-8');
    const line = md.split('\n').find((l) => l.startsWith('| integrator'))!;
    expect(line).toContain('method dopri5');
    expect(line).toMatch(/tolerance 1(\.0*)?e-8/);
    expect(integrator.tolerance).toBe(1e-8);
  });
});
