// Time-of-flight checks against closed forms:
// - Wiley & McLaren, Rev. Sci. Instrum. 26, 1150 (1955), eq. 9 (first-order space focus of a
//   two-field source; equation quoted from memory): at the distance D it gives, the flight time
//   of the engine's integrated ions is stationary in the start position.
// - Mamyrin et al., Sov. Phys. JETP 37, 45 (1973): a single-stage reflectron focuses energy to
//   first order when the field-free path is four times the penetration depth.
// - t = t0 + k·sqrt(m/z) for a field-free drift (standard kinematics).

import { describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { parseScene } from '../../sim/scene/load.js';
import { runScene } from '../../sim/runs/run-scene.js';
import { readIons } from '../../sim/runfolder/reader.js';
import { flightTime, spaceFocusDistance, extractionFieldForFocus } from '../../sim/analysis/wiley-mclaren.js';
import { fitMassCalibration } from '../../sim/analysis/arrival.js';
import { ionMassKg, ELEMENTARY_CHARGE } from '../../sim/units/constants.js';
import { tempDir } from '../helpers/cli.js';

const e = ELEMENTARY_CHARGE;

async function arrivalTimes(yaml: string): Promise<Float64Array> {
  const dir = join(tempDir(), 'run');
  await runScene(parseScene(yaml, 'tof.yaml'), { out: dir, workers: 1 });
  const ions = readIons(dir);
  expect(ions.fate.every((f) => f === 'detected')).toBe(true);
  return ions.end_time;
}

function sourceScene(driftM: number, zs: number[]): string {
  return `
stages:
  - type: source
    extraction: { length: 10 mm, voltage: 2 kV }
    acceleration: { length: 10 mm, voltage: 18 kV }
  - type: drift
    length: ${driftM} m
ions:
${zs.map((z) => `  - { mz: 1000, count: 1, position: { z: ${z} mm }, energy: 0 eV }`).join('\n')}
run: { max_time: 200 us, record_every: 0 }
`;
}

describe('Wiley–McLaren two-field source', () => {
  const src = { s0: 5e-3, Es: 2e3 / 10e-3, d: 10e-3, Ed: 18e3 / 10e-3 };
  const D = spaceFocusDistance(src);

  it('engine flight times equal the closed-form kinematics to 1e-9', async () => {
    const t = await arrivalTimes(sourceScene(D, [5]));
    const m = ionMassKg(1000, 1);
    expect(Math.abs(t[0] - flightTime(src, D, e, m)) / t[0]).toBeLessThan(1e-9);
  });

  it('the flight time is stationary in start position at D (eq. 9) and not at D/2', async () => {
    const dz = 0.01; // mm
    const [tm, , tp] = await arrivalTimes(sourceScene(D, [5 - dz, 5, 5 + dz]));
    const [hm, , hp] = await arrivalTimes(sourceScene(D / 2, [5 - dz, 5, 5 + dz]));
    const slopeAtFocus = Math.abs(tp - tm) / (2 * dz);
    const slopeAtHalf = Math.abs(hp - hm) / (2 * dz);
    // First order cancels at D: what is left is third order in dz (1e-5 relative of the first-order
    // slope at D/2 would already be generous for dz = 10 µm of a 5 mm start distance).
    expect(slopeAtHalf).toBeGreaterThan(0);
    expect(slopeAtFocus / slopeAtHalf).toBeLessThan(1e-3);
  });

  it('solves the extraction field that puts the focus at a given drift length', () => {
    const Es = extractionFieldForFocus(src.s0, src.d, src.Ed, 1.0);
    expect(Es).not.toBeNull();
    expect(spaceFocusDistance({ ...src, Es: Es! })).toBeCloseTo(1.0, 9);
  });
});

describe('single-stage reflectron', () => {
  // Ions at 20 kV per charge (±0.5%), 0.8 m drift out and back (L = 1.6 m), mirror 0.5 m long.
  // Penetration p = U·Lr/Vr; first-order focus when L = 4p → Vr = 4·U·Lr/L = 25 kV.
  const scene = (vr: number, eps: number) => `
stages:
  - type: drift
    length: 0.8 m
    detect_returning: true
  - type: reflectron
    length: 0.5 m
    voltage: ${vr} V
ions:
  - { mz: 1000, count: 1, energy: ${20000 * (1 - eps)} eV }
  - { mz: 1000, count: 1, energy: 20000 eV }
  - { mz: 1000, count: 1, energy: ${20000 * (1 + eps)} eV }
run: { max_time: 300 us, record_every: 0 }
`;
  it('is stationary in energy at L = 4p, and a linear analyzer is not', async () => {
    const eps = 1e-3;
    const [tm, t0, tp] = await arrivalTimes(scene(25000, eps));
    const relSlope = Math.abs(tp - tm) / (2 * eps) / t0; // |dt/dU|·U/t
    // Field-free flight: dt/dU·U/t = −1/2 exactly; the focused mirror cancels the first order.
    expect(relSlope).toBeLessThan(0.5 * 1e-3);
    const [um, u0, up] = await arrivalTimes(scene(32000, eps));
    expect(Math.abs(up - um) / (2 * eps) / u0).toBeGreaterThan(0.05);
  });

  it('flight time matches the closed form L/v + 2mv/(qE)', async () => {
    const [, t0] = await arrivalTimes(scene(25000, 1e-3));
    const m = ionMassKg(1000, 1);
    const v = Math.sqrt((2 * e * 20000) / m);
    const E = 25000 / 0.5;
    const expected = 1.6 / v + (2 * m * v) / (e * E);
    expect(Math.abs(t0 - expected) / expected).toBeLessThan(1e-9);
  });
});

describe('mass calibration', () => {
  it('fits t = t0 + k·sqrt(m/z) to drift times with t0 ≈ 0 and k = L·sqrt(u/(2eV))', async () => {
    const yaml = `
stages:
  - { type: drift, length: 1 m }
ions:
${[500, 1000, 2000].map((mz) => `  - { mz: ${mz}, count: 1, energy: 20000 eV }`).join('\n')}
run: { max_time: 300 us, record_every: 0 }
`;
    const t = await arrivalTimes(yaml);
    const fit = fitMassCalibration([500, 1000, 2000], Array.from(t))!;
    const k = 1 * Math.sqrt(ionMassKg(1, 1) / (2 * e * 20000));
    expect(Math.abs(fit.k - k) / k).toBeLessThan(1e-9);
    expect(Math.abs(fit.t0)).toBeLessThan(1e-15);
  });
});
