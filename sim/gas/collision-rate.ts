// How often an ion meets the buffer gas: the figure that says whether RF motion survives between
// collisions (a trap or guide whose ions collide more often than once per RF period is
// collision-dominated: the ions drift rather than oscillate).

import type { GasSettings } from './settings.js';
import { mobilityFromReduced, numberDensity, reducedMass } from './mobility.js';
import { BOLTZMANN, VACUUM_PERMITTIVITY } from '../units/constants.js';

/**
 * Collision frequency of an ion of mass m and charge q in the gas, 1/s, from what the gas block
 * gives, in this order:
 *  - reduced mobility K0: momentum-transfer frequency ν = |q| / (μ K), from K = |q|/(μ ν)
 *    (Mason & McDaniel, Transport Properties of Ions in Gases, 1988, ch. 1);
 *  - cross section σ: ν = n σ ⟨v_rel⟩ with the thermal mean relative speed ⟨v_rel⟩ = (8kT/(πμ))^½
 *    (hard spheres; an ion faster than thermal collides more often, so this is a lower bound);
 *  - otherwise the Langevin capture rate ν = n · 2π (q² α' / (4π ε0 μ))^½, α' the polarizability
 *    volume (Gioumousis & Stevenson, J. Chem. Phys. 29, 294 (1958)).
 */
export function collisionFrequency(gas: GasSettings, ionMassKg: number, chargeC: number): number {
  const mu = reducedMass(ionMassKg, gas.massKg);
  const n = numberDensity(gas.pressurePa, gas.temperatureK);
  if (gas.reducedMobility !== undefined) {
    return Math.abs(chargeC) / (mu * mobilityFromReduced(gas.reducedMobility, gas.pressurePa, gas.temperatureK));
  }
  if (gas.crossSectionM2 !== undefined) {
    return n * gas.crossSectionM2 * Math.sqrt((8 * BOLTZMANN * gas.temperatureK) / (Math.PI * mu));
  }
  return n * 2 * Math.PI * Math.sqrt((chargeC * chargeC * gas.polarizabilityM3) / (4 * Math.PI * VACUUM_PERMITTIVITY * mu));
}
