// The detector's radius and where it comes from (sim/scene/detector.ts), on the demo scenes, and
// the scene keys of issue 11 through the loader: units checked, one-line errors.

import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { parseScene } from '../../sim/scene/load.js';
import { detectorOf } from '../../sim/scene/detector.js';
import type { QuadrupoleStage } from '../../sim/scene/types.js';
import { repoRoot } from '../bench/cbuild.js';

const ROOT = repoRoot();
const demo = (name: string) => parseScene(readFileSync(join(ROOT, 'scenes', name), 'utf8'), name);

describe('detector', () => {
  it('defaults: a drift without aperture after the rods takes r0; an aperture of the last stage wins; none: unbounded', () => {
    const drift = 'qf4-compact-filter-drift.yaml';
    expect(detectorOf(parseScene(readFileSync(join(ROOT, 'test/fixtures', drift), 'utf8'), drift))).toEqual({ radius: 0.004, source: 'r0 of stage 0' });
    // The QF-4 demo itself names its detector in the rods' exit plane.
    expect(detectorOf(demo('qf4-compact-filter.yaml'))).toEqual({ radius: 0.004, source: 'scene' });
    // Linear TOF: a source entry (two resolved stages) then a drift with a 20 mm aperture: the
    // scene-file index of the drift is 1.
    expect(detectorOf(demo('lt1-linear-tof.yaml'))).toEqual({ radius: 0.02, source: 'aperture of stage 1' });
    // Reflectron: the last stage (the reflectron) has no aperture and there is no RF stage.
    expect(detectorOf(demo('rt1-reflectron-tof.yaml'))).toEqual({ radius: Infinity, source: 'none' });
    // Trap: ions leave through the end-cap hole, the aperture of its exit plane.
    expect(detectorOf(demo('t7-mass-scan.yaml'))).toEqual({ radius: 0.0015, source: 'aperture of stage 0' });
  });

  it('the scene key, in any length unit, wins over the default', () => {
    const text = readFileSync(join(ROOT, 'test/fixtures/qf4-compact-filter-drift.yaml'), 'utf8') + 'detector: { radius: 1.25 cm }\n';
    expect(detectorOf(parseScene(text, 'f.yaml'))).toEqual({ radius: 0.0125, source: 'scene' });
  });

  it('a filter as the last stage: its exit plate, which defaults to r0 and follows it', () => {
    const base = `stages:\n  - { type: quadrupole, length: 100 mm, r0: 4 mm, rf: { amplitude: 1 V, frequency: 1 MHz }KEYS }\nions:\n  - { mz: 100, count: 1 }\n`;
    expect(detectorOf(parseScene(base.replace('KEYS', ''), 'q.yaml'))).toEqual({ radius: 0.004, source: 'aperture of stage 0' });
    const s = parseScene(base.replace('KEYS', ', exit_aperture: 2.5 mm, entrance_aperture: 1 mm'), 'q.yaml');
    expect(detectorOf(s)).toEqual({ radius: 0.0025, source: 'aperture of stage 0' });
    const st = s.stages[0] as QuadrupoleStage;
    expect([st.entranceAperture, st.exitAperture]).toEqual([0.001, 0.0025]);
    // Not given: not stored, so that a sweep of r0 moves the holes with the rods.
    expect('entranceAperture' in parseScene(base.replace('KEYS', ''), 'q.yaml').stages[0]).toBe(false);
  });

  it('bad input: one line naming file, line, key and the expected unit', () => {
    const base = `stages:\n  - { type: quadrupole, length: 100 mm, r0: 4 mm, rf: { amplitude: 1 V, frequency: 1 MHz } }\nions:\n  - { mz: 100, count: 1 }\n`;
    expect(() => parseScene(base + 'detector: { radius: 5 V }\n', 'd.yaml')).toThrow(/^d\.yaml:5: detector\.radius: expects a length such as 4 mm, got '5 V'$/);
    expect(() => parseScene(base + 'detector: { radius: -1 mm }\n', 'd.yaml')).toThrow(/^d\.yaml:5: detector\.radius: must be gr/);
    expect(() => parseScene(base + 'detector: {}\n', 'd.yaml')).toThrow(/^d\.yaml:5: detector.*radius/);
    expect(() => parseScene(base.replace('} }', '}, exit_aperture: 3 Hz }'), 'd.yaml')).toThrow(/^d\.yaml:2: stages\.0\.exit_aperture: expects a length such as 4 mm, got '3 Hz'$/);
  });
});
