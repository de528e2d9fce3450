// Checks of the drag (Langevin / Ornstein–Uhlenbeck) gas model against its exact solution
// (S. Chandrasekhar, Rev. Mod. Phys. 15, 1 (1943), ch. II) and against equipartition.
// Ion m/z 200 (1+) in N2 at 300 K with K0 = 1.5 cm^2/(V s): demo numbers, not data.

import { describe, expect, it } from 'vitest';
import { BOLTZMANN, ELEMENTARY_CHARGE, ionMassKg, TORR } from '../../sim/units/constants.js';
import { findGasSpecies } from '../../sim/gas/species-lookup.js';
import { conditionalPositionFactor, dragFriction, gasMobility, makeDragFieldStep } from '../../sim/gas/drag.js';
import type { GasSpec } from '../../sim/gas/model.js';
import { meanKineticEnergy, relax, startBatch } from '../../sim/gas/relax.js';
import { ksPValue, ksStatistic, maxwellSpeedCdf, mean, speeds, variance } from './stats.js';

const n2 = findGasSpecies('N2')!;
const T = 300;
const kT = BOLTZMANN * T;
const gas: GasSpec = {
  species: 'N2', massKg: n2.massKg, polarizabilityM3: n2.polarizabilityM3,
  pressurePa: 1 * TORR, temperatureK: T, model: 'drag', reducedMobility: 1.5e-4,
};
const m = ionMassKg(200, 1);
const q = ELEMENTARY_CHARGE;
const K = gasMobility(gas, m, q);
const gamma = q / (m * K);

describe('drag gas model', () => {
  it('thermalises ions released at rest to 3/2 kT and a Maxwellian at the ion mass', () => {
    // Equipartition (kinetic theory); after 12/γ the OU velocity is Maxwellian to e^{-24}.
    const ions = 20000;
    const r = relax({ gas, seed: 21, ions, ionMassKg: m, chargeC: q, durationS: 12 / gamma, stepS: 0.5 / gamma });
    const ke = meanKineticEnergy(r.batch);
    // Relative standard error of the mean KE: (2/3)^½/√20000 = 0.58 %; 3 % is > 5 of them.
    expect(Math.abs(ke / (1.5 * kT) - 1)).toBeLessThan(0.03);
    // Kolmogorov–Smirnov against Maxwell–Boltzmann (Numerical Recipes 3rd ed., §14.3.3), 1 % level.
    const v = speeds(r.batch.vx, r.batch.vy, r.batch.vz);
    expect(ksPValue(ksStatistic(v, (s) => maxwellSpeedCdf(s, kT, m)), ions)).toBeGreaterThan(0.01);
    expect(ksPValue(ksStatistic(v, (s) => maxwellSpeedCdf(s, 1.1 * kT, m)), ions)).toBeLessThan(1e-3);
  }, 60_000);

  it('velocity relaxes as v0 e^{-γt} with variance kT/m (1 − e^{-2γt}), for one step or many', () => {
    // Chandrasekhar (1943), ch. II: the OU transition density is Gaussian with these moments, so a
    // single step of length t and 64 steps give the same distribution.
    const ions = 20000;
    const v0 = 3 * Math.sqrt(kT / m);
    const t = 0.7 / gamma;
    const meanV = v0 * Math.exp(-gamma * t);
    const varV = (kT / m) * (1 - Math.exp(-2 * gamma * t));
    for (const steps of [1, 64]) {
      const r = relax({ gas, seed: 22, ions, ionMassKg: m, chargeC: q, durationS: t, stepS: t / steps,
        startVelocityMS: [v0, 0, 0] });
      const vx = r.batch.vx;
      // Standard errors at N = 20000: mean (varV/N)^½; variance varV·(2/N)^½ (1 %). Allow 4 of each.
      expect(Math.abs(mean(vx) - meanV)).toBeLessThan(4 * Math.sqrt(varV / ions));
      expect(Math.abs(variance(vx) / varV - 1)).toBeLessThan(4 * Math.sqrt(2 / ions));
    }
  }, 60_000);

  it('drift velocity in a uniform field equals K·E (exact OU-with-force step)', () => {
    // v_d = K E by definition of the mobility; the step is exact, so any dt gives it.
    const ions = 4000;
    const vd = 0.5 * Math.sqrt(kT / m);
    const ez = vd / K;
    const t = 1000 / gamma;
    const r = relax({ gas, seed: 23, ions, ionMassKg: m, chargeC: q, durationS: t, stepS: 10 / gamma,
      startTemperatureK: T, fieldVPerM: [0, 0, ez] });
    const z = mean(r.batch.z);
    // Exact mean from a thermal start: z(t) = v_d (t − (1 − e^{-γt})/γ).
    const expected = vd * (t - (1 - Math.exp(-gamma * t)) / gamma);
    // Standard error (2Dt/N)^½ with D = K kT/q (Einstein); allow 4 of them. Relative to v_d t that
    // is 0.14 %, and the start transient is 1/(γt) = 0.1 %, so z/t is also within 1 % of K·E.
    const d = (K * kT) / q;
    expect(Math.abs(z - expected)).toBeLessThan(4 * Math.sqrt((2 * d * t) / ions));
    expect(Math.abs(z / t / vd - 1)).toBeLessThan(0.01);
  }, 60_000);

  it('position spreads with the Einstein diffusion coefficient D = K kT/(ze)', () => {
    // From a thermal start, Var x(t) = (2kT/(mγ²)) (γt − 1 + e^{-γt}) (Chandrasekhar 1943, ch. II),
    // → 2Dt for γt ≫ 1 with D = kT/(mγ) = K kT/q. One exact step and 50 steps both hold it.
    const ions = 20000;
    const t = 5 / gamma;
    const expected = ((2 * kT) / (m * gamma * gamma)) * (gamma * t - 1 + Math.exp(-gamma * t));
    for (const steps of [1, 50]) {
      const r = relax({ gas, seed: 24, ions, ionMassKg: m, chargeC: q, durationS: t, stepS: t / steps,
        startTemperatureK: T, fieldVPerM: [1e-9, 0, 0] }); // a token field selects the exact x–v step
      // Sample variance: relative standard error (2/N)^½ = 1 %; allow 4 %.
      expect(Math.abs(variance(r.batch.y) / expected - 1)).toBeLessThan(0.04);
    }
    expect(expected / (2 * ((K * kT) / q) * t)).toBeCloseTo(1 - (1 - Math.exp(-5)) / 5, 12);
  }, 60_000);

  it('the correlated position noise has the exact conditional variance at small and large γdt', () => {
    // 2h − 4 tanh(h/2) must equal σ_x² − σ_xv²/σ_v² from Chandrasekhar's moments (ch. II);
    // the series branch (h < 0.01) is compared to the direct formula evaluated in long form at
    // h where both are accurate, to 1e-9 relative.
    for (const h of [3e-3, 9.9e-3, 1e-2, 0.3, 2, 10]) {
      const e = Math.exp(-h);
      const direct = 2 * h - 3 + 4 * e - e * e - ((1 - e) ** 4) / (1 - e * e);
      const tol = h < 0.05 ? 1e-6 : 1e-12; // the long form itself cancels like h^3 at small h
      expect(Math.abs(conditionalPositionFactor(h) / direct - 1)).toBeLessThan(tol);
    }
    // Series and closed form meet at the switch: continuity to 1e-10.
    expect(Math.abs(conditionalPositionFactor(0.00999999) / (2 * 0.00999999 - 4 * Math.tanh(0.00999999 / 2)) - 1)).toBeLessThan(1e-7);
  });

  it('uses the same random draws whatever the batching', () => {
    const o = { gas, seed: 25, ions: 16, ionMassKg: m, chargeC: q, durationS: 1, stepS: 1, startTemperatureK: T };
    const a = startBatch(o);
    const b = startBatch(o);
    const sa = makeDragFieldStep(gas, o.seed);
    const sb = makeDragFieldStep(gas, o.seed);
    for (let k = 0; k < 5; k++) {
      for (let i = 0; i < 16; i++) sa(a, i, 0.3 / gamma, 0, 0, 100);
      for (let i = 15; i >= 0; i--) sb(b, i, 0.3 / gamma, 0, 0, 100);
    }
    for (let i = 0; i < 16; i++) {
      expect(b.z[i]).toBe(a.z[i]);
      expect(b.vx[i]).toBe(a.vx[i]);
    }
  });

  it('friction from Mason–Schamp is |q|/K for ions and stays finite for a neutral', () => {
    // ζ = |q|/K with K = (3/16)(|q|/N)(2π/(μkT))^½/Ω (Mason & McDaniel 1988) is charge-free, so a
    // neutral in the drag model still relaxes to 3/2 kT (equipartition).
    const ms: GasSpec = { ...gas, reducedMobility: undefined, crossSectionM2: 200e-20 };
    for (const z of [1, 2, -1]) {
      expect(dragFriction(ms, m, z * q) * gasMobility(ms, m, z * q) / Math.abs(z * q)).toBeCloseTo(1, 12);
    }
    const zeta = dragFriction(ms, m, 0);
    expect(zeta / (q / gasMobility(ms, m, q))).toBeCloseTo(1, 12);
    const ions = 4000;
    const r = relax({ gas: ms, seed: 26, ions, ionMassKg: m, chargeC: 0, durationS: (20 * m) / zeta, stepS: (2 * m) / zeta });
    // Relative standard error of the mean KE at N = 4000: 1.3 %; allow 6 % (4.6 σ).
    expect(Math.abs(meanKineticEnergy(r.batch) / (1.5 * kT) - 1)).toBeLessThan(0.06);
    // With a given reduced mobility a neutral feels nothing: it keeps its velocity.
    const free = relax({ gas, seed: 27, ions: 4, ionMassKg: m, chargeC: 0, durationS: 1e-3, stepS: 1e-4, startVelocityMS: [10, 0, 0] });
    expect(free.batch.vx[0]).toBe(10);
  });
});
