// Mobility formulas against their textbook forms and CODATA constants.

import { describe, expect, it } from 'vitest';
import { ATOMIC_MASS_UNIT, BOLTZMANN, ELEMENTARY_CHARGE, ionMassKg, LOSCHMIDT, TORR } from '../../sim/units/constants.js';
import { findGasSpecies } from '../../sim/gas/species-lookup.js';
import {
  langevinMobility, masonSchampMobility, mobilityFromReduced, numberDensity, reducedMass, reducedMobility,
} from '../../sim/gas/mobility.js';

const he = findGasSpecies('He')!;

describe('mobility', () => {
  it('Langevin polarization limit for He matches K0 = 13.853/(α μ)^½ cm^2/(V s)', () => {
    // Textbook practical form, α in Å^3 and μ in u (Mason & McDaniel, Transport Properties of Ions
    // in Gases, 1988, ch. 6; from memory). The 1973 edition (McDaniel & Mason) gives 13.876; our
    // value from the Langevin capture rate × 1.105 lies between. Tolerance 0.3 % covers both
    // editions' constant (they differ by 0.17 %).
    const alphaA3 = he.polarizabilityM3 / 1e-30;
    for (const mz of [4, 28, 100, 500, 2000]) {
      const m = ionMassKg(mz, 1);
      const k0 = langevinMobility(m, he.massKg, he.polarizabilityM3, LOSCHMIDT) * 1e4; // cm^2/(V s)
      const muU = reducedMass(m, he.massKg) / ATOMIC_MASS_UNIT;
      const textbook = 13.853 / Math.sqrt(alphaA3 * muU);
      expect(Math.abs(k0 / textbook - 1)).toBeLessThan(0.003);
    }
  });

  it("Langevin's own form 0.5105 [(m+M)/m]^½ [ρ(D−1)]^-½ (Gaussian units) agrees", () => {
    // Langevin (1905) pure-polarization limit as quoted by McDaniel & Mason (1973) and Mason &
    // McDaniel (1988), ch. 6 (from memory): K = 0.5105 ((m+M)/m)^½ / (ρ (D−1))^½ in Gaussian units,
    // ρ = N M the gas mass density and D − 1 = 4π N α' (dilute gas). Evaluated here in cgs and
    // converted with 1 statV = 299.792458 V: an independent path through the units. 0.1 % covers
    // the rounding of 0.5105 and of the 1.105 cross-section ratio.
    const nCgs = LOSCHMIDT * 1e-6; // cm^-3
    const gasG = he.massKg * 1e3; // g
    const alphaCm3 = he.polarizabilityM3 * 1e6;
    for (const mz of [10, 300]) {
      const m = ionMassKg(mz, 1);
      const rho = nCgs * gasG;
      const dMinus1 = 4 * Math.PI * nCgs * alphaCm3;
      const kGauss = (0.5105 * Math.sqrt((m + he.massKg) / m)) / Math.sqrt(rho * dMinus1); // cm^2/(statV s)
      const kCgsVolt = kGauss / 299.792458; // cm^2/(V s)
      const ours = langevinMobility(m, he.massKg, he.polarizabilityM3, LOSCHMIDT) * 1e4;
      expect(Math.abs(ours / kCgsVolt - 1)).toBeLessThan(1e-3);
    }
  });

  it('Mason–Schamp equals (3/4) q/(μ N ⟨g⟩ Ω), the momentum-transfer form', () => {
    // With ⟨g⟩ = (8kT/(πμ))^½, (3/16)(2π/(μkT))^½ = (3/4)/(μ⟨g⟩): the first-approximation
    // momentum-transfer frequency of hard spheres is ν_m = (4/3) N Ω ⟨g⟩ (Mason & McDaniel 1988, ch. 5).
    const T = 300, n = numberDensity(1e-3 * TORR, T), omega = 150e-20;
    for (const z of [1, 3]) {
      const m = ionMassKg(300, z);
      const mu = reducedMass(m, he.massKg);
      const g = Math.sqrt((8 * BOLTZMANN * T) / (Math.PI * mu));
      const q = z * ELEMENTARY_CHARGE;
      const k = masonSchampMobility(m, q, he.massKg, T, n, omega);
      expect(k / ((0.75 * q) / (mu * n * g * omega))).toBeCloseTo(1, 12);
    }
  });

  it('reduced mobility is K·N/N0 with N0 the CODATA 2018 Loschmidt constant', () => {
    // N0 = 2.686780111e25 m^-3 at 273.15 K, 101.325 kPa (CODATA 2018); numberDensity uses p/(kT).
    for (const [p, T] of [[1, 300], [TORR, 295], [101325, 273.15], [0.133, 500]]) {
      const k = 2.3;
      const k0 = reducedMobility(k, p, T);
      expect(k0 / ((k * numberDensity(p, T)) / 2.686780111e25)).toBeCloseTo(1, 9);
      expect(mobilityFromReduced(k0, p, T)).toBeCloseTo(k, 12);
    }
  });
});
