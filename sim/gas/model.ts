// The resolved buffer-gas description the engine hands to the gas kernels (SI throughout), and the
// shape of the per-ion step they return.

import type { IonBatch } from '../core/batch.js';

export type GasModel = 'hard-sphere' | 'drag';

export interface GasSpec {
  /** Name as given in the scene ("He", or "custom"). */
  species: string;
  /** Mass of one gas particle, kg. */
  massKg: number;
  /** Dipole polarizability volume α' = α/(4πε0), m^3. */
  polarizabilityM3: number;
  pressurePa: number;
  temperatureK: number;
  model: GasModel;
  /** Ion–gas collision cross section, m^2 (hard-sphere σ; Ω in Mason–Schamp for drag). */
  crossSectionM2?: number;
  /** Reduced mobility K0 at 273.15 K and 101.325 kPa, m^2/(V s); drag model only. */
  reducedMobility?: number;
}

/**
 * Advance ion i's interaction with the gas over [t, t+dt] with its position frozen (operator
 * splitting: the engine's field step moves the ion, this step changes only its velocity).
 * Mutates batch.vx/vy/vz[i], batch.gasCounter[i] and, for hard-sphere, batch.collisions[i].
 */
export type GasStep = (batch: IonBatch, i: number, dt: number) => void;

/**
 * Drag model in a uniform field E (V/m): advances position AND velocity of ion i over dt exactly
 * (Ornstein–Uhlenbeck process with a constant force). The field here replaces the engine's field
 * step for that ion; do not also apply the field separately.
 */
export type GasFieldStep = (batch: IonBatch, i: number, dt: number, ex: number, ey: number, ez: number) => void;

/** A gas description that cannot be used: `key` is the scene key at fault (e.g. "cross_section"). */
export class GasSpecError extends Error {
  override name = 'GasSpecError';
  constructor(readonly key: string, message: string) {
    super(`gas.${key} ${message}`);
  }
}

/** Reject values the kernels cannot work with; messages name the key and the expected unit. */
export function checkGasSpec(gas: GasSpec): void {
  const positive = (v: number | undefined, key: string, unit: string): void => {
    if (v === undefined || !Number.isFinite(v) || v <= 0) {
      throw new GasSpecError(key, `expects a positive ${unit}, got ${v}`);
    }
  };
  positive(gas.massKg, 'mass', 'mass such as 4 u');
  if (!Number.isFinite(gas.polarizabilityM3) || gas.polarizabilityM3 < 0) {
    throw new GasSpecError('polarizability', `expects a volume >= 0 such as 0.205 A^3, got ${gas.polarizabilityM3}`);
  }
  positive(gas.pressurePa, 'pressure', 'pressure such as 1 mTorr');
  positive(gas.temperatureK, 'temperature', 'temperature such as 300 K');
  if (gas.model === 'hard-sphere') {
    positive(gas.crossSectionM2, 'cross_section', 'area such as 150 A^2 (required for hard-sphere)');
  } else if (gas.model === 'drag') {
    if (gas.reducedMobility !== undefined) positive(gas.reducedMobility, 'reduced_mobility', 'mobility such as 2.1 cm^2/(V s)');
    else positive(gas.crossSectionM2, 'cross_section', 'area such as 150 A^2 (or give reduced_mobility)');
  } else {
    throw new GasSpecError('model', `expects hard-sphere or drag, got '${String(gas.model)}'`);
  }
}
