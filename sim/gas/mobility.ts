// Low-field ion mobility in a neutral gas.
// Mason & McDaniel, Transport Properties of Ions in Gases (Wiley, 1988), ch. 5–6.

import { BOLTZMANN, STANDARD_PRESSURE, STANDARD_TEMPERATURE, VACUUM_PERMITTIVITY } from '../units/constants.js';

/** Ideal-gas number density n = p/(kT), 1/m^3. */
export function numberDensity(pressurePa: number, temperatureK: number): number {
  return pressurePa / (BOLTZMANN * temperatureK);
}

export function reducedMass(ionMassKg: number, gasMassKg: number): number {
  return (ionMassKg * gasMassKg) / (ionMassKg + gasMassKg);
}

/**
 * Mason–Schamp low-field mobility, first Chapman–Enskog approximation (Mason & McDaniel 1988,
 * the "fundamental low-field ion mobility equation"):
 *   K = (3/16) (|q|/N) (2π/(μ kT))^½ / Ω,
 * Ω the momentum-transfer collision integral (for hard spheres the geometric cross section).
 * Result in m^2/(V s); q in C.
 */
export function masonSchampMobility(ionMassKg: number, chargeC: number, gasMassKg: number,
  temperatureK: number, numberDensityM3: number, crossSectionM2: number): number {
  const mu = reducedMass(ionMassKg, gasMassKg);
  return (3 / 16) * (Math.abs(chargeC) / numberDensityM3)
    * Math.sqrt((2 * Math.PI) / (mu * BOLTZMANN * temperatureK)) / crossSectionM2;
}

/** Reduced mobility K0 = K (N/N0), N0 the Loschmidt density at 273.15 K and 101.325 kPa. */
export function reducedMobility(mobility: number, pressurePa: number, temperatureK: number): number {
  return mobility * (pressurePa / STANDARD_PRESSURE) * (STANDARD_TEMPERATURE / temperatureK);
}

/** Mobility K at (p, T) from the reduced mobility K0: K = K0 (p0/p)(T/T0). */
export function mobilityFromReduced(k0: number, pressurePa: number, temperatureK: number): number {
  return k0 * (STANDARD_PRESSURE / pressurePa) * (temperatureK / STANDARD_TEMPERATURE);
}

/**
 * Ratio of the momentum-transfer cross section to the Langevin capture cross section for the
 * pure ion-induced-dipole (r^-4) potential, classical: 1.105 (Dalgarno, McDowell & Williams,
 * Phil. Trans. R. Soc. A 250, 411 (1958); value from memory).
 */
export const POLARIZATION_MOMENTUM_RATIO = 1.105;

/**
 * Polarization (Langevin) limit of the mobility. For an r^-4 potential the momentum-transfer rate
 * does not depend on speed (Maxwell molecules), so K = q/(μ N k_m) exactly, with
 * k_m = 1.105 · k_L and the Langevin capture rate k_L = 2π (α' q²/(4πε0 μ))^½. The charge cancels:
 *   K = (4πε0)^½ / (2π · 1.105 · N (α' μ)^½).
 * This is Langevin's K = 0.5105 ((m+M)/m)^½ (ρ(D−1))^-½ in Gaussian units (ρ gas density, D its
 * dielectric constant; Mason & McDaniel 1988, ch. 6), in practical units
 * K0 ≈ 13.85/(α'[Å^3] μ[u])^½ cm^2/(V s). Result in m^2/(V s).
 */
export function langevinMobility(ionMassKg: number, gasMassKg: number, polarizabilityM3: number,
  numberDensityM3: number): number {
  const mu = reducedMass(ionMassKg, gasMassKg);
  const fourPiEps0 = 4 * Math.PI * VACUUM_PERMITTIVITY;
  return Math.sqrt(fourPiEps0 / (polarizabilityM3 * mu))
    / (2 * Math.PI * POLARIZATION_MOMENTUM_RATIO * numberDensityM3);
}
