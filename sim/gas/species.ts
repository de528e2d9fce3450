// Built-in buffer gases: mass and static dipole polarizability volume α' = α/(4πε0).
//
// Masses: standard atomic weights (IUPAC/CIAAW 2013; N2 = 2 × 14.0067), in u.
// Polarizabilities: CRC Handbook of Chemistry and Physics, table "Atomic and Molecular
// Polarizabilities" (T. M. Miller), in 1e-24 cm^3 = Å^3. Both quoted from memory of those tables;
// the He value is also the theoretical one (0.204956 Å^3) to the digits given.

import { ATOMIC_MASS_UNIT } from '../units/constants.js';

export interface GasSpecies {
  /** Chemical symbol or formula as written in a scene (`species: He`). */
  name: string;
  /** Mass of one gas particle, kg. */
  massKg: number;
  /** Static dipole polarizability volume α' = α/(4πε0), m^3. */
  polarizabilityM3: number;
  /** Where the numbers come from. */
  source: string;
}

const A3 = 1e-30; // Å^3 in m^3
const SOURCE = 'mass: IUPAC standard atomic weight; polarizability: CRC Handbook, Atomic and Molecular Polarizabilities (from memory)';

export const GAS_SPECIES: readonly GasSpecies[] = [
  { name: 'He', massKg: 4.002602 * ATOMIC_MASS_UNIT, polarizabilityM3: 0.204956 * A3, source: SOURCE },
  { name: 'Ne', massKg: 20.1797 * ATOMIC_MASS_UNIT, polarizabilityM3: 0.3956 * A3, source: SOURCE },
  { name: 'Ar', massKg: 39.948 * ATOMIC_MASS_UNIT, polarizabilityM3: 1.6411 * A3, source: SOURCE },
  { name: 'N2', massKg: 28.0134 * ATOMIC_MASS_UNIT, polarizabilityM3: 1.7403 * A3, source: SOURCE },
];
