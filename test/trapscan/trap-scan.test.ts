// Mass-selective scans of the ideal RF trap against the Mathieu module:
// - instability scan: ions leave along z where q_z crosses the β_z = 1 edge (q_z = 0.908 at
//   a_z = 0; March & Todd, Quadrupole Ion Trap Mass Spectrometry, 2005, ch. 2);
// - resonance ejection: a dipolar AC at f_aux ejects where the secular frequency β_z f/2 equals it
//   (March & Todd ch. 3), with β_z from our Floquet code (itself checked against the published
//   characteristic values in test/mathieu).
// Ions need a few RF cycles of growth after crossing the ejection point, so the measured q_z lies
// slightly above the crossing: the tolerances below allow that lag (a few tenths of a percent of
// q per cycle at this scan rate) and no more.

import { describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { parseScene } from '../../sim/scene/load.js';
import { runScene } from '../../sim/runs/run-scene.js';
import { floquet } from '../../sim/mathieu/floquet.js';
import { tempDir } from '../helpers/cli.js';

const scene = (aux: string, runKeys = 'steps_per_cycle: 40') => `
seed: 4
stages:
  - type: trap
    r0: 7.07 mm
    z0: 5 mm
    rf: { amplitude: 300 V, frequency: 1.05 MHz, ramp: { to: 700 V, over: 2 ms } }
    aperture: 1.5 mm
${aux}
ions:
  - mz: 100
    count: 40
    position: { z: 5 mm, spread: 0.05 mm, spread_z: 0.05 mm }
    energy: 0.01 eV
    direction: isotropic
run: { ${runKeys}, max_time: 2 ms, record_every: 0 }
`;

async function scan(aux: string, runKeys?: string) {
  const s = await runScene(parseScene(scene(aux, runKeys), 'scan.yaml'), { out: join(tempDir(), 'run'), workers: 1 });
  return s.scan as { mode: string; species: { ejected: number; ejection_qz_mean: number; ejection_qz_expected: number; apparent_mz: number }[] };
}

describe('RF trap mass scans', () => {
  it.each([['rk4', undefined], ['dopri5', 'integrator: dopri5, tolerance: 1e-8']])('instability scan ejects at the β_z = 1 edge, q_z ≈ 0.908 (%s)', async (_n, keys) => {
    const r = await scan('', keys);
    expect(r.mode).toBe('instability');
    const sp = r.species[0];
    expect(sp.ejected).toBeGreaterThan(10);
    expect(sp.ejection_qz_expected).toBeCloseTo(0.908, 3);
    expect(sp.ejection_qz_mean).toBeGreaterThanOrEqual(0.9);
    expect(Math.abs(sp.ejection_qz_mean - 0.908) / 0.908).toBeLessThan(0.02);
    // The spectrum's m/z scale comes from the same edge: the apparent m/z is within 2%.
    expect(Math.abs(sp.apparent_mz - 100) / 100).toBeLessThan(0.02);
  });

  it('resonance ejection happens where β_z f/2 equals the supplementary frequency', async () => {
    // f_aux = 0.25 f → β_z = 0.5.
    const r = await scan('    aux: { amplitude: 2 V, frequency: 262.5 kHz }');
    expect(r.mode).toBe('resonance-ejection');
    const sp = r.species[0];
    expect(sp.ejected).toBeGreaterThan(10);
    // Expected q_z from the Floquet β: β_z(q) = 0.5 at a_z = 0.
    expect(floquet(0, sp.ejection_qz_expected).beta!).toBeCloseTo(0.5, 8);
    expect(Math.abs(sp.ejection_qz_mean - sp.ejection_qz_expected) / sp.ejection_qz_expected).toBeLessThan(0.03);
    expect(sp.ejection_qz_mean).toBeLessThan(0.8);
  });
});
