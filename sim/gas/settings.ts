// A resolved gas block (scene top level or one stage), SI: what the gas models are built from.

export interface GasSettings {
  species: string;
  /** kg */
  massKg: number;
  /** Dipole polarizability volume, m^3. */
  polarizabilityM3: number;
  pressurePa: number;
  temperatureK: number;
  model: 'hard-sphere' | 'drag';
  crossSectionM2?: number;
  /** Reduced mobility K0, m^2/(V s). */
  reducedMobility?: number;
}
