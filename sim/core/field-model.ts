// The field of one stage, as the parts of the tool that are not its kernel see it: the energy
// check, the coupled space-charge stepper, the transfer-matrix path and the reports. A stage's
// field is a sum of unit solutions driven by time-dependent coefficients,
//   Φ(x, t) = Σ_k c_k(t)·φ_k(x),   E(x, t) = Σ_k c_k(t)·E_k(x),   E_k = −∇φ_k,
// (superposition for the Laplace equation; the DC, RF and supplementary drives of ideal stages
// are such terms, and so are the electrode unit solutions of a solved field).
// Coordinates are stage-local: x, y transverse, z measured from the stage's reference plane
// `zRef` (lab z); time is the run clock.

/** One unit solution and its drive. */
export interface FieldTerm {
  /** What drives it, for provenance and reports: 'dc', 'rf', 'aux', 'uniform'. */
  readonly name: string;
  /**
   * c_k: volts applied to the unit solution at run time t, s, for an ion whose RF clock is offset
   * by tau (its RF phase is Ω(t + τ) + φ; amplitude ramps and supplementary AC run on t).
   */
  drive(t: number, tau?: number): number;
  /** φ_k at a stage-local point, V per volt of drive. */
  unitPotential(x: number, y: number, z: number): number;
  /** E_k = −∇φ_k at a stage-local point, (V/m) per volt, written to out[0..2]. */
  unitField(x: number, y: number, z: number, out: Float64Array): void;
}

export interface FieldModel {
  readonly terms: readonly FieldTerm[];
  /** Lab z of the stage-local origin, m. */
  readonly zRef: number;
  /**
   * Equations of motion linear in x and y with a field independent of z inside the stage (ideal
   * quadrupole or field-free): the transfer-matrix path may replace integration.
   */
  readonly linear: boolean;
  /** Nothing varies in time (no RF amplitude, ramp or supplementary AC). */
  readonly steady: boolean;
  /** Potential of the exit plane minus that of the entrance plane, V (DC parts). */
  readonly drop: number;
  /** DC potential relative to the stage entrance at a stage-local point, V. */
  dcPotential(x: number, y: number, z: number): number;
  /** Full potential Σ c_k(t)·φ_k at a stage-local point and field time t, V. */
  potential(x: number, y: number, z: number, t: number, tau?: number): number;
  /**
   * Add (q/m)·E(x, t) of ions 0..n−1 at stage-local positions into ax, ay, az (m/s²): the
   * per-ensemble form the coupled stepper calls once per step.
   */
  addAcceleration(t: number, n: number, x: Float64Array, y: Float64Array, z: Float64Array, qm: Float64Array,
    ax: Float64Array, ay: Float64Array, az: Float64Array): void;
  /** True when a stage-local point lies on or beyond an electrode (the loss test). */
  outside(x: number, y: number, z: number): boolean;
}

/** Σ c_k(t)·φ_k from the terms (for models with no faster form). */
export function sumPotential(terms: readonly FieldTerm[], x: number, y: number, z: number, t: number, tau = 0): number {
  let p = 0;
  for (const k of terms) p += k.drive(t, tau) * k.unitPotential(x, y, z);
  return p;
}
