// Ion loss on the electrodes of the ideal trap and the IonBatch adapter.
import { describe, it, expect } from 'vitest';
import { ELEMENTARY_CHARGE, ionMassKg } from '../../sim/units/constants.js';
import { allocateBatch, Fate } from '../../sim/core/batch.js';
import { runEnsemble, ensembleFromBatch, markLosses } from '../../sim/spacecharge/ensemble-step.js';
import { gaussianCloud } from './clouds.js';
import { centredTrapField } from './trap-fields.js';

const r0 = 5e-3, z0 = r0 / Math.SQRT2, fRF = 1e6, omega = 2 * Math.PI * fRF;
const m = ionMassKg(200, 1), e = ELEMENTARY_CHARGE, D = r0 * r0 + 2 * z0 * z0;
const volts = (qz: number) => (qz * m * D * omega * omega) / (8 * e); // DESIGN.md q_z
const trap = (qz: number) => ({ kind: 'field' as const, model: centredTrapField(r0, z0, 0, volts(qz), fRF) });

describe('losses in an ideal RF trap', () => {
  it('keeps every ion at q_z = 0.4 and loses every ion beyond the a = 0 edge (q_z = 1.0 > 0.908)', () => {
    // Stability edge q_z ≈ 0.908 at a = 0: March & Todd, Quadrupole Ion Trap Mass Spectrometry,
    // 2nd ed., Wiley 2005, Ch. 2 (from memory); 1.0 is well outside, 0.4 well inside.
    for (const [qz, expectAlive] of [[0.4, 60], [1.0, 0]] as const) {
      const ens = gaussianCloud(60, 0.3e-3, 0.3e-3, m, e, 31);
      const h = runEnsemble(ens, {
        tEnd: 200 / fRF, h: 1 / (40 * fRF), external: trap(qz), recordEvery: 100,
        spaceCharge: { method: 'direct', weight: 1 },
      });
      expect(h.alive[h.alive.length - 1]).toBe(expectAlive);
      // Recorded survivors never increase.
      for (let k = 1; k < h.alive.length; k++) expect(h.alive[k]).toBeLessThanOrEqual(h.alive[k - 1]);
    }
  });

  it('records when and where each ion left: on or past the electrodes, at a step time, as the history counts', () => {
    // Beyond the a = 0 edge (q_z = 1.0) every ion leaves; the loss surfaces are those of the
    // ideal trap (ring r² − 2z² = r0², end caps 2z² − r² = 2z0², DESIGN.md geometry).
    const ens = gaussianCloud(60, 0.3e-3, 0.3e-3, m, e, 33);
    ens.lostAt = new Float64Array(60).fill(-1);
    const h = 1 / (40 * fRF), tEnd = 200 / fRF;
    const hist = runEnsemble(ens, { tEnd, h, external: trap(1.0), recordEvery: 20, spaceCharge: { method: 'direct', weight: 1 } });
    for (let i = 0; i < 60; i++) {
      const t = ens.lostAt[i];
      expect(ens.alive[i]).toBe(0);
      expect(t).toBeGreaterThan(0);
      expect(t).toBeLessThanOrEqual(tEnd * (1 + 1e-12));
      // A whole number of steps (the stepper checks after each drift).
      expect(Math.abs(t / h - Math.round(t / h))).toBeLessThan(1e-6);
      const r2 = ens.x[i] ** 2 + ens.y[i] ** 2, z2 = 2 * ens.z[i] ** 2;
      expect(r2 - z2 >= r0 * r0 || z2 - r2 >= 2 * z0 * z0).toBe(true);
    }
    // The recorded survivor counts are the ions whose loss time lies after each record.
    for (let k = 0; k < hist.t.length; k++) {
      const still = Array.from(ens.lostAt).filter((t) => t > hist.t[k] * (1 + 1e-12)).length;
      expect(hist.alive[k]).toBe(still);
    }
  });

  it('runs an IonBatch in place and writes the fate of lost ions back', () => {
    const b = allocateBatch(40);
    const src = gaussianCloud(40, 0.3e-3, 0.3e-3, m, e, 32);
    b.x.set(src.x); b.y.set(src.y); b.z.set(src.z); b.mass.set(src.mass); b.charge.set(src.charge);
    b.fate[3] = Fate.detected; // already gone before the run: must not move nor count as a source
    const x3 = b.x[3];
    const ens = ensembleFromBatch(b);
    runEnsemble(ens, { tEnd: 100 / fRF, h: 1 / (40 * fRF), external: trap(1.0), spaceCharge: { method: 'tree', weight: 5 } });
    expect(b.x[3]).toBe(x3);
    expect(markLosses(ens, b)).toBe(39);
    expect(b.fate[3]).toBe(Fate.detected);
    for (let i = 0; i < 40; i++) if (i !== 3) expect(b.fate[i]).toBe(Fate.hit);
  });
});
