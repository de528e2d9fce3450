// Name → built-in gas species, for the scene loader and the CLI.

import { GAS_SPECIES, type GasSpecies } from './species.js';

export const GAS_SPECIES_NAMES: readonly string[] = GAS_SPECIES.map((s) => s.name);

/** The built-in species called `name` (case-insensitive: "he", "HE", "n2"), or undefined. */
export function findGasSpecies(name: unknown): GasSpecies | undefined {
  if (typeof name !== 'string') return undefined;
  const key = name.trim().toLowerCase();
  return GAS_SPECIES.find((s) => s.name.toLowerCase() === key);
}
