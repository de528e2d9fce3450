// Warnings for legal but implausible inputs (sim/engine/checks.ts, each kind's plausibility):
// each names the stage and key, the value, the range it left and why. The ranges are common
// practice, no source (see sim/stages/shared/plausible.ts and checks.ts); the collision figure is
// checked against a hand-worked kinetic-theory value in test/gas/collision-rate.test.ts.

import { describe, expect, it } from 'vitest';
import { readdirSync } from 'node:fs';
import { loadSceneFile, parseScene } from '../../sim/scene/load.js';
import { sceneWarnings } from '../../sim/engine/checks.js';

const TRAP = (r0: string, rf: string, pressure: string) => `
stages:
  - type: trap
    r0: ${r0}
    rf: { amplitude: ${rf}, frequency: 1.05 MHz }
gas: { species: He, pressure: ${pressure}, temperature: 300 K, model: hard-sphere, cross_section: 150 A^2 }
ions:
  - { mz: 609, count: 10, energy: 0.05 eV }
`;

const warn = (text: string) => sceneWarnings(parseScene(text, 's.yaml'));

describe('implausible inputs', () => {
  it('an r0 of 4 m (for 4 mm) in a trap and in a filter', () => {
    expect(warn(TRAP('4 m', '400 V', '1 mTorr'))).toEqual([expect.stringMatching(/^stages\.0 \(trap\): r0 = 4000 mm is outside the 0\.5–50 mm of RF ion traps in use \(common practice, no source\)/)]);
    expect(warn(TRAP('0.1 mm', '400 V', '1 mTorr'))[0]).toMatch(/r0 = 0\.1 mm is outside/);
    expect(warn(TRAP('7.07 mm', '400 V', '1 mTorr'))).toEqual([]);
    const filter = `
stages:
  - { type: quadrupole, length: 150 mm, r0: 4 m, rf: { amplitude: 832 V, frequency: 1.2 MHz } }
ions:
  - { mz: 502, count: 10, energy: 5 eV }
`;
    expect(warn(filter)).toEqual([expect.stringMatching(/^stages\.0 \(quadrupole\): r0 = 4000 mm .* quadrupole mass filters/)]);
  });

  it('832 kV of RF (for 832 V): above 20 kV, breakdown', () => {
    const w = warn(TRAP('7.07 mm', '832 kV', '1 mTorr'));
    expect(w).toEqual([expect.stringMatching(/^stages\.0 \(trap\): RF amplitude 832 kV is above 20 kV, where electrodes and feedthroughs break down/)]);
    expect(warn(TRAP('7.07 mm', '5 kV', '1 mTorr'))).toEqual([]);
  });

  it('a buffer-gas pressure that makes the trap collision-dominated', () => {
    // 1 Torr He: ~6·10⁷ collisions/s for m/z 609 (hard spheres, 150 Å²) against 1.05 MHz RF;
    // 1 mTorr: ~6·10⁴/s, well below.
    const w = warn(TRAP('7.07 mm', '400 V', '1 Torr'));
    expect(w).toHaveLength(1);
    expect(w[0]).toMatch(/^stages\.0 \(trap\): at 133 Pa of He an ion of m\/z 609 collides about 6\.\de\+7 times per second, more often than the RF frequency 1050000 Hz: the motion is collision-dominated/);
  });

  it('a drift longer than 10 m, and a gap above 30 kV', () => {
    const tof = (len: string, v: string) => `
stages:
  - type: source
    extraction: { length: 5 mm, voltage: 300 V }
    acceleration: { length: 10 mm, voltage: ${v} }
  - { type: drift, length: ${len} }
ions:
  - { mz: 100, count: 5, position: { z: 2.5 mm }, energy: 0.02 eV }
`;
    expect(warn(tof('12 m', '2700 V'))).toEqual([expect.stringMatching(/^stages\.1 \(drift\): a drift of 12 m is longer than the 10 m of any flight tube in use/)]);
    expect(warn(tof('1.2 m', '2700 V'))).toEqual([]);
    expect(warn(tof('1.2 m', '270 kV'))).toEqual([expect.stringMatching(/^stages\.0 \(accelerate\): 270 kV across the source-acceleration is above the ~30 kV/)]);
  });

  it('none on the demo scenes (real operating points of the Skerry family)', () => {
    for (const f of readdirSync('scenes').filter((x) => x.endsWith('.yaml'))) {
      expect(sceneWarnings(loadSceneFile(`scenes/${f}`).scene), f).toEqual([]);
    }
  });
});
