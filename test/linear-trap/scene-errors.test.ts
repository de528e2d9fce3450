// Bad multipole and linear-trap scene entries: one line naming the file, line, key and what is
// expected (the loader's message, checked in-process); through `iontrail run` that line is all of
// stderr, the exit code 2 and nothing is written (DEVELOPERS.md, rules of the house).
import { describe, expect, it } from 'vitest';
import { existsSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { iontrail, tempDir } from '../helpers/cli.js';
import { parseScene } from '../../sim/scene/load.js';
import { checkIntegrator } from '../../sim/engine/checks.js';

const ions = 'ions: [ { mz: 200, count: 2 } ]\n';
const cases: [string, string, RegExp][] = [
  ['odd poles', 'stages:\n  - { type: multipole, poles: 7, length: 100 mm, r0: 3 mm, rf: { amplitude: 100 V, frequency: 2 MHz } }\n', /bad\.yaml:2: stages\.0\.poles: expects an even number of rods \(4, 6, 8, \.\.\.\), got '7'/],
  ['poles below 4', 'stages:\n  - { type: multipole, poles: 2, length: 100 mm, r0: 3 mm, rf: { amplitude: 100 V, frequency: 2 MHz } }\n', /bad\.yaml:2: stages\.0\.poles: .*4/],
  ['missing r0', 'stages:\n  - { type: multipole, poles: 8, length: 100 mm, rf: { amplitude: 100 V, frequency: 2 MHz } }\n', /bad\.yaml:2: stages\.0\.r0: .*(missing|required)/i],
  ['end_dc without unit', 'stages:\n  - type: linear-trap\n    r0: 4 mm\n    length: 40 mm\n    rf: { amplitude: 200 V, frequency: 1 MHz }\n    end_dc: 10\n    kappa: 0.05\n', /bad\.yaml:6: stages\.0\.end_dc: .*voltage/],
  ['kappa missing', 'stages:\n  - type: linear-trap\n    r0: 4 mm\n    length: 40 mm\n    rf: { amplitude: 200 V, frequency: 1 MHz }\n    end_dc: 10 V\n', /bad\.yaml:2: stages\.0\.kappa: .*(missing|required)/i],
];

describe('one-line errors of multipole and linear-trap entries', () => {
  for (const [what, yaml, want] of cases) {
    it(what, () => {
      expect(() => parseScene(yaml + ions, 'bad.yaml')).toThrow(want);
    });
  }
  for (const [what, yaml, want] of [cases[0], cases[3]]) {
    it(`${what}: iontrail run exits 2 with that one line and writes nothing`, () => {
      const dir = tempDir();
      const file = join(dir, 'bad.yaml'), out = join(dir, 'out');
      writeFileSync(file, yaml + ions);
      const r = iontrail(['run', file, '-o', out]);
      expect(r.code).toBe(2);
      expect(r.stderr.trim().split('\n')).toHaveLength(1);
      expect(r.stderr).toMatch(want);
      expect(existsSync(out)).toBe(false);
    });
  }
  it('integrator dopri5 on a kind without an adaptive form: refused in one line, not stepped with RK4 under its name', () => {
    const scene = parseScene('stages:\n  - { type: multipole, poles: 8, length: 100 mm, r0: 3 mm, rf: { amplitude: 100 V, frequency: 2 MHz } }\n' + ions + 'run: { integrator: dopri5 }\n', 'd5.yaml');
    expect(() => checkIntegrator(scene)).toThrow(/^run\.integrator: dopri5 cannot integrate stage 0 \(the multipole kernel has no adaptive form yet\); use rk4$/);
  });
});
