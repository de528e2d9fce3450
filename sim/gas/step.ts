// Entry point for the engine: one GasStep per resolved gas block and run seed.

import { makeDragStep } from './drag.js';
import { makeHardSphereStep } from './hardsphere.js';
import { checkGasSpec, type GasSpec, type GasStep } from './model.js';

/** Precomputes everything for `gas` once; the returned step allocates nothing per call. */
export function makeGasStep(gas: GasSpec, seed: number): GasStep {
  checkGasSpec(gas);
  return gas.model === 'hard-sphere' ? makeHardSphereStep(gas, seed) : makeDragStep(gas, seed);
}
