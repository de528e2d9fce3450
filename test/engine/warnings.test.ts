// Warnings of issue 3: too few steps per RF cycle, and energy drift above 1e-6 in a scene with no
// time-dependent field (there ½mv² + qΦ must be constant: a check of the integrator, not of a
// published value). Both reach stderr and summary.json.

import { describe, expect, it } from 'vitest';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { iontrail, tempDir } from '../helpers/cli.js';

const scene = (spc: number, amplitude: string, dc: string) => `
stages:
  - type: quadrupole
    length: 50 mm
    r0: 4 mm
    rf: { amplitude: ${amplitude}, frequency: 1.2 MHz }
    dc: ${dc}
ions:
  - { mz: 502, count: 20, position: { x: 0.5 mm, spread: 0.1 mm }, energy: 5 eV }
run: { steps_per_cycle: ${spc}, max_time: 100 us, record_every: 0 }
`;

function run(text: string) {
  const d = tempDir();
  writeFileSync(join(d, 's.yaml'), text);
  const r = iontrail(['run', join(d, 's.yaml'), '-o', join(d, 'o'), '--json']);
  expect(r.code, r.stderr).toBe(0);
  return { stderr: r.stderr, summary: JSON.parse(r.stdout) };
}

describe('run warnings', () => {
  it('warns below 20 steps per RF cycle', () => {
    const r = run(scene(12, '600 V', '40 V'));
    expect(r.stderr).toMatch(/warning: run\.steps_per_cycle = 12 is below 20/);
    expect(r.summary.warnings.join(' ')).toMatch(/steps_per_cycle = 12/);
    expect(run(scene(40, '600 V', '40 V')).summary.warnings).toEqual([]);
  });

  it('warns when energy drifts by more than 1e-6 in an electrostatic-only scene', () => {
    // DC-only quadrupole (a saddle: x is bound, y escapes): at 4 steps per "cycle" the RK4 energy
    // error far exceeds 1e-6; at 400 it stays below.
    const coarse = run(scene(4, '0 V', '500 V'));
    expect(coarse.summary.stats.max_energy_error).toBeGreaterThan(1e-6);
    expect(coarse.stderr).toMatch(/energy drift .* exceeds 1e-6/);
    const fine = run(scene(400, '0 V', '500 V'));
    expect(fine.summary.stats.max_energy_error).toBeLessThan(1e-6);
    expect(fine.summary.warnings.join(' ')).not.toMatch(/energy drift/);
  });
});
