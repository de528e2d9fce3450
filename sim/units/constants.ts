// Physical constants, SI. Source: CODATA 2018 recommended values
// (E. Tiesinga et al., Rev. Mod. Phys. 93, 025010 (2021)); e and k_B are exact since the 2019 SI.

/** Elementary charge, C (exact). */
export const ELEMENTARY_CHARGE = 1.602176634e-19;
/** Boltzmann constant, J/K (exact). */
export const BOLTZMANN = 1.380649e-23;
/** Unified atomic mass unit, kg (CODATA 2018). */
export const ATOMIC_MASS_UNIT = 1.6605390666e-27;
/** Vacuum electric permittivity, F/m (CODATA 2018). */
export const VACUUM_PERMITTIVITY = 8.8541878128e-12;
/** Avogadro constant, 1/mol (exact). */
export const AVOGADRO = 6.02214076e23;
/** Standard pressure used for reduced mobility, Pa (1 atm, exact by definition). */
export const STANDARD_PRESSURE = 101325;
/** Standard temperature used for reduced mobility, K (0 °C). */
export const STANDARD_TEMPERATURE = 273.15;
/** Loschmidt number density at 273.15 K, 101.325 kPa, 1/m^3 (CODATA 2018: 2.686780111e25). */
export const LOSCHMIDT = 2.686780111e25;
/** 1 eV in joules (= e × 1 V). */
export const ELECTRONVOLT = ELEMENTARY_CHARGE;
/** 1 Torr in pascals (101325/760, exact by definition). */
export const TORR = 101325 / 760;

/**
 * Ion mass from m/z and charge number: m = (m/z)·z·u. The electron mass is neglected
 * (a relative error of about 5.5e-4/(m/z) per charge, below 1e-6 above m/z 550).
 */
export function ionMassKg(mz: number, charge: number): number {
  return mz * Math.abs(charge) * ATOMIC_MASS_UNIT;
}
