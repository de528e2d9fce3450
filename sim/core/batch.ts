// Struct-of-arrays state of a batch of ions. Batches are cut by global ion index (a fixed batch
// size, independent of the worker count), so every per-batch reduction is the same on any machine.

export interface IonBatch {
  /** Number of ions in the batch. */
  n: number;
  /** Global ion index (row in ions.arrow); keys the ion's random streams. */
  index: Float64Array;
  /** Population (entry of `ions:` in the scene). */
  population: Int32Array;
  /** Mass, kg, and charge, C (signed). */
  mass: Float64Array;
  charge: Float64Array;
  /** Time, s, since the run started (each ion carries its own clock). */
  t: Float64Array;
  /** Position, m, and velocity, m/s, in instrument coordinates (z along the stages). */
  x: Float64Array; y: Float64Array; z: Float64Array;
  vx: Float64Array; vy: Float64Array; vz: Float64Array;
  /** Fate code (see Fate) and the stage the ion is in now. */
  fate: Int8Array;
  stage: Int32Array;
  /** Counter of each ion's gas random stream, and its number of collisions so far. */
  gasCounter: Float64Array;
  collisions: Float64Array;
}

/**
 * How an ion's flight ended. detected: it crossed the detector plane (the exit plane of the last
 * stage) inside the detector radius, or a kind's own detector took it (a reflectron's). hit: it
 * struck an electrode or the rim of an aperture. missed: it reached the detector plane outside
 * the detector. returned: it left back through the entrance of the first stage. alive: still in
 * flight at max_time.
 */
export const Fate = { alive: 0, detected: 1, hit: 2, missed: 3, returned: 4 } as const;
export type FateCode = (typeof Fate)[keyof typeof Fate];
/** Fate names by code (the `fate` column of ions.arrow). */
export const FATE_NAMES = ['alive', 'detected', 'hit', 'missed', 'returned'] as const;

export function allocateBatch(n: number): IonBatch {
  const f = () => new Float64Array(n);
  return {
    n, index: f(), population: new Int32Array(n), mass: f(), charge: f(), t: f(),
    x: f(), y: f(), z: f(), vx: f(), vy: f(), vz: f(),
    fate: new Int8Array(n), stage: new Int32Array(n), gasCounter: f(), collisions: f(),
  };
}
