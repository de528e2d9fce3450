// Checks of the hard-sphere Monte Carlo gas against kinetic theory.
// Ion m/z 100 (1+) in helium at 300 K, σ = 100 Å^2: demo-scale numbers chosen for speed, not data.

import { describe, expect, it } from 'vitest';
import { allocateBatch } from '../../sim/core/batch.js';
import { BOLTZMANN, ELEMENTARY_CHARGE, ionMassKg, TORR } from '../../sim/units/constants.js';
import { findGasSpecies } from '../../sim/gas/species-lookup.js';
import { masonSchampMobility, numberDensity, reducedMass } from '../../sim/gas/mobility.js';
import type { GasSpec } from '../../sim/gas/model.js';
import { makeGasStep } from '../../sim/gas/step.js';
import { makeHardSphereKernel } from '../../sim/gas/hardsphere.js';
import { meanKineticEnergy, relax, startBatch } from '../../sim/gas/relax.js';
import { erfc, ksPValue, ksStatistic, maxwellSpeedCdf, mean, speeds } from './stats.js';

const he = findGasSpecies('He')!;
const T = 300;
const kT = BOLTZMANN * T;
const gas: GasSpec = {
  species: 'He', massKg: he.massKg, polarizabilityM3: he.polarizabilityM3,
  pressurePa: 1e-3 * TORR, temperatureK: T, model: 'hard-sphere', crossSectionM2: 100e-20,
};
const m = ionMassKg(100, 1);
const q = ELEMENTARY_CHARGE;
const n = numberDensity(gas.pressurePa, T);
const mu = reducedMass(m, he.massKg);
// Mean relative speed of an ion in equilibrium with the gas, ⟨g⟩ = (8kT/(πμ))^½
// (Mason & McDaniel, Transport Properties of Ions in Gases, 1988, ch. 5).
const gMean = Math.sqrt((8 * kT) / (Math.PI * mu));
const collisionRate = n * gas.crossSectionM2! * gMean;

describe('hard-sphere gas', () => {
  it('thermalises ions released at 0.5 eV to 3/2 kT and a Maxwellian at the ion mass', () => {
    // Equipartition: mean KE 3/2 kT (kinetic theory). Energy relaxes by ≈ 2mM/(m+M)^2 per
    // collision (≈ 1/13 here), so 200 collisions per ion are ≈ 15 e-folds from 0.5 eV (13 kT).
    const ions = 10000;
    const r = relax({ gas, seed: 11, ions, ionMassKg: m, chargeC: q, durationS: 200 / collisionRate,
      stepS: 6 / collisionRate, startSpeedMS: Math.sqrt((2 * 0.5 * ELEMENTARY_CHARGE) / m) });
    const ke = meanKineticEnergy(r.batch);
    // KE of one ion in equilibrium has standard deviation (3/2)^½ kT, so the mean of 10000 has a
    // relative standard error of (2/3)^½/√10000 = 0.82 %; 3 % is > 3.6 standard errors.
    expect(Math.abs(ke / (1.5 * kT) - 1)).toBeLessThan(0.03);
    // Speed distribution: one-sample Kolmogorov–Smirnov test against Maxwell–Boltzmann at the ion
    // mass and gas temperature, asymptotic p-value (Numerical Recipes 3rd ed., §14.3.3); reject at 1 %.
    const v = speeds(r.batch.vx, r.batch.vy, r.batch.vz);
    const d = ksStatistic(v, (s) => maxwellSpeedCdf(s, kT, m));
    expect(ksPValue(d, ions)).toBeGreaterThan(0.01);
    // Power of the test: the same speeds against a Maxwellian 10 % hotter must be rejected.
    const dHot = ksStatistic(v, (s) => maxwellSpeedCdf(s, 1.1 * kT, m));
    expect(ksPValue(dHot, ions)).toBeLessThan(1e-3);
  }, 60_000);

  it('mean free time equals 1/(n σ ⟨g⟩) for an ion in equilibrium with the gas', () => {
    // Hard spheres, ⟨g⟩ = (8kT/(πμ))^½ (Mason & McDaniel 1988). 5000 ions × 200 collisions: the
    // count is near-Poisson, relative standard error 1/√1e6 = 0.1 %; the 3 % is 30 σ, so we
    // also hold it to 1 %.
    const ions = 5000;
    const duration = 200 / collisionRate;
    const r = relax({ gas, seed: 12, ions, ionMassKg: m, chargeC: q, durationS: duration,
      stepS: duration / 40, startTemperatureK: T });
    let hits = 0;
    for (let i = 0; i < ions; i++) hits += r.batch.collisions[i];
    const meanFreeTime = (ions * duration) / hits;
    expect(Math.abs(meanFreeTime * collisionRate - 1)).toBeLessThan(0.01);
  });

  it('collisions do not depend on the step (null-collision method, Skullerud 1968)', () => {
    // Field-free, the velocity changes only at collisions; with the carried-over optical depth the
    // sequence of collisions, hence the final velocities, are the same for any dt.
    const base = { gas, seed: 13, ions: 300, ionMassKg: m, chargeC: q, durationS: 50 / collisionRate,
      startTemperatureK: T };
    const a = relax({ ...base, stepS: base.durationS / 10 }).batch;
    const b = relax({ ...base, stepS: base.durationS / 777 }).batch;
    let same = 0;
    for (let i = 0; i < a.n; i++) {
      if (a.collisions[i] === b.collisions[i] && Math.abs(a.vx[i] - b.vx[i]) < 1e-9 * Math.abs(a.vx[i]) + 1e-9) same++;
    }
    // Rounding in the accumulated depth can move a collision across the end time only if it falls
    // within ~1e-15 s of it; allow one such ion.
    expect(same).toBeGreaterThanOrEqual(a.n - 1);
    expect(a.collisions.reduce((s, x) => s + x, 0)).toBeGreaterThan(40 * a.n);
  });

  it('an ion\'s collisions do not depend on how ions are batched', () => {
    const o = { gas, seed: 14, ions: 64, ionMassKg: m, chargeC: q, durationS: 20 / collisionRate,
      stepS: 1 / collisionRate, startTemperatureK: T };
    const whole = startBatch(o);
    const step = makeGasStep(gas, o.seed);
    // Same ions in two batches of 32, in reverse order of processing, with a fresh step function.
    const parts = [allocateBatch(32), allocateBatch(32)];
    for (let i = 0; i < 64; i++) {
      const p = parts[i >> 5], j = i & 31;
      p.index[j] = whole.index[i]; p.mass[j] = whole.mass[i]; p.charge[j] = whole.charge[i];
      p.vx[j] = whole.vx[i]; p.vy[j] = whole.vy[i]; p.vz[j] = whole.vz[i];
    }
    const step2 = makeGasStep(gas, o.seed);
    for (let k = 0; k < 20; k++) {
      for (let i = 0; i < 64; i++) step(whole, i, o.stepS);
      for (let j = 31; j >= 0; j--) step2(parts[1], j, o.stepS);
      for (let j = 0; j < 32; j++) step2(parts[0], j, o.stepS);
    }
    for (let i = 0; i < 64; i++) {
      const p = parts[i >> 5], j = i & 31;
      expect(p.vx[j]).toBe(whole.vx[i]);
      expect(p.vz[j]).toBe(whole.vz[i]);
      expect(p.gasCounter[j]).toBe(whole.gasCounter[i]);
    }
  });

  it('drift velocity at low E/N matches Mason–Schamp K·E within 10 %', () => {
    // Mason–Schamp is the first Chapman–Enskog approximation (Mason & McDaniel 1988, ch. 5); for
    // hard spheres the exact mobility exceeds it by a factor between 1 (heavy ion, m ≫ M) and
    // 32/(9π) ≈ 1.13 (Lorentz limit, m ≪ M). At m/M = 25 the gap is small, and the MC is exact.
    const k = masonSchampMobility(m, q, he.massKg, T, n, gas.crossSectionM2!);
    const vd = 60; // m/s ≪ (kT/m)^½ = 158 m/s and ½Mv_d² ≈ 2e-3 kT: low field
    const ez = vd / k;
    const ions = 2000;
    const duration = 2000 / collisionRate;
    const r = relax({ gas, seed: 15, ions, ionMassKg: m, chargeC: q, durationS: duration,
      stepS: 0.5 / collisionRate, startTemperatureK: T, fieldVPerM: [0, 0, ez] });
    let z = 0;
    for (let i = 0; i < ions; i++) z += r.batch.z[i];
    const drift = z / ions / duration;
    // Statistical error: (2Dt/N)^½/t with D = K kT/q ≈ 0.45 m/s (0.75 %); the start transient lowers
    // the mean by ≈ τ_m/t ≈ 1.3 %. Both are far inside the 10 % allowed for the first approximation.
    expect(Math.abs(drift / vd - 1)).toBeLessThan(0.10);
  }, 60_000);

  it('the kernel pieces for a stepping loop give the same bits as the plain step', () => {
    // Same ions through a toy harmonic field (x'' = −ω² x, leapfrog) with the gas either as GasStep
    // or with the depth and velocity held in locals; every draw and collision must coincide.
    const o = { gas, seed: 16, ions: 40, ionMassKg: m, chargeC: q, durationS: 1, stepS: 1, startTemperatureK: T };
    const a = startBatch(o);
    const b = startBatch(o);
    const h = 0.3 / collisionRate, w2 = (2 * Math.PI * 5e3) ** 2, steps = 400; // ω h ≈ 0.2: leapfrog stable
    const step = makeGasStep(gas, o.seed);
    const k = makeHardSphereKernel(gas, o.seed);
    for (let i = 0; i < o.ions; i++) {
      for (let n = 0; n < steps; n++) {
        a.vx[i] -= w2 * a.x[i] * h; a.x[i] += a.vx[i] * h;
        step(a, i, h);
      }
      let x = b.x[i], vx = b.vx[i], vy = b.vy[i], vz = b.vz[i];
      k.enter(b, i);
      let s = k.depth, lim = k.limit2, rate = k.rate;
      for (let n = 0; n < steps; n++) {
        vx -= w2 * x * h; x += vx * h;
        const v2 = vx * vx + vy * vy + vz * vz, d = s - rate * h;
        if (v2 <= lim && d > 0) s = d;
        else {
          b.vx[i] = vx; b.vy[i] = vy; b.vz[i] = vz;
          k.collide(b, i, h, s);
          s = k.depth; lim = k.limit2; rate = k.rate;
          vx = b.vx[i]; vy = b.vy[i]; vz = b.vz[i];
        }
      }
      k.leave(b, i, s);
      b.x[i] = x; b.vx[i] = vx; b.vy[i] = vy; b.vz[i] = vz;
      expect(b.vx[i]).toBe(a.vx[i]);
      expect(b.vz[i]).toBe(a.vz[i]);
      expect(b.collisions[i]).toBe(a.collisions[i]);
    }
    expect(a.collisions.reduce((t, c) => t + c, 0)).toBeGreaterThan(40 * 50);
  });

  it('collision rate of an ion at fixed speed v follows n σ ⟨|v − V|⟩ over the Maxwellian, slow to fast', () => {
    // ⟨g⟩(v) = a [(s + 1/(2s)) erf(s) + e^{−s²}/√π], s = v/a, a = (2kT/M)^½: the mean relative
    // speed of a particle of speed v in a Maxwellian gas (G. A. Bird, Molecular Gas Dynamics and the
    // Direct Simulation of Gas Flows, 1994, ch. 4; from memory). A 1e6 u ion keeps its speed
    // (ΔV/V ~ M/m = 4e-6 per collision). s = 3 is far above the bound's floor, s = 0.1 below it.
    const heavy = ionMassKg(1e6, 1);
    const a = Math.sqrt((2 * kT) / he.massKg);
    for (const sRatio of [0.1, 1, 3]) {
      const v = sRatio * a;
      const gv = a * ((sRatio + 1 / (2 * sRatio)) * (1 - erfc(sRatio)) + Math.exp(-sRatio * sRatio) / Math.sqrt(Math.PI));
      const rate = n * gas.crossSectionM2! * gv;
      const ions = 2000;
      const duration = 100 / rate;
      const r = relax({ gas, seed: 17, ions, ionMassKg: heavy, chargeC: q, durationS: duration, stepS: duration / 20,
        startVelocityMS: [v, 0, 0] });
      let hits = 0;
      for (let i = 0; i < ions; i++) hits += r.batch.collisions[i];
      // 2e5 collisions: Poisson relative error 0.22 %; 1.5 % is ~7 σ and far above erfc's 1e-7.
      expect(Math.abs(hits / (ions * duration) / rate - 1)).toBeLessThan(0.015);
    }
  });

  it('a slow heavy ion feels the Epstein drag (4/3) σ n M c̄ v (specular spheres)', () => {
    // P. S. Epstein, Phys. Rev. 23, 710 (1924): drag on a sphere moving slowly through a gas,
    // F = δ (4π/3) R² n M c̄ v with δ = 1 for specular reflection; isotropic hard-sphere scattering
    // in the centre-of-mass frame is specular reflection, and σ = πR². For m ≫ M this is also the
    // Mason–Schamp friction |q|/K. Mean velocity decays as v0 e^{−γt}, γ = (4/3) σ n M c̄/m.
    const heavy = ionMassKg(1e5, 1);
    const cBar = Math.sqrt((8 * kT) / (Math.PI * he.massKg));
    const gamma = ((4 / 3) * gas.crossSectionM2! * n * he.massKg * cBar) / heavy;
    const v0 = 0.05 * cBar; // s = v/a ≈ 0.056: the linear (slow) regime to O(s²) ≈ 0.3 %
    const ions = 4000;
    const duration = 500 / (n * gas.crossSectionM2! * cBar); // ≈ 500 collisions per ion, γt ≈ 0.027
    const r = relax({ gas, seed: 18, ions, ionMassKg: heavy, chargeC: q, durationS: duration, stepS: duration / 10,
      startVelocityMS: [v0, 0, 0] });
    const measured = -Math.log(mean(r.batch.vx) / v0) / duration;
    // Random kicks: ≈ (M/m) c̄ per collision, so the mean of 4000 ions after 500 collisions scatters
    // by ≈ 0.015 m/s against a decrease of γ t v0 ≈ 1.7 m/s: 0.9 %; allow 4 %.
    expect(Math.abs(measured / gamma - 1)).toBeLessThan(0.04);
  });
});
