// The "beside" part of a report: the scene's m/z sweep and that of a second scene over the same
// m/z points (e.g. a filter of round rods beside the hyperbolic filter of the same r0), and the
// multipole content of every planar electrodes stage of either scene. Data only (results.json);
// the report document draws it.

import type { MultipoleTerm } from '../fields/multipoles.js';

export interface BesidePeak { mz: number; fwhm_mz: number | null; resolution_50: number | null; resolution_10: number | null; transmission: number }

export interface BesideSweep {
  scene_name: string;
  scene_file: string;
  method: string;
  peak: BesidePeak | null;
  /** Transmission at each m/z of `BesideResult.mz`. */
  transmission: number[];
}

export interface BesideMultipoles {
  /** Which scene (0 the report's, 1 the one beside it) and its stage index. */
  scene: number;
  stage: number;
  reference_radius_m: number;
  /** Terms at the electrodes' dc volts; `relative` is the term over the n = 2 cos term. */
  terms: (MultipoleTerm & { relative_cos: number; relative_sin: number })[];
  /**
   * The n = 2 term against an ideal quadrupole stage of the other scene at the same DC:
   * A₂ = cos_v(2) / (U (r_ref / r0)²), with r0 and U of that stage; null without one.
   */
  a2: { value: number; r0_m: number; dc_v: number; against_scene: number; against_stage: number } | null;
}

export interface BesideResult {
  varied: string;
  ions_per_point: number;
  mz: number[];
  sweeps: BesideSweep[];
  multipoles: BesideMultipoles[];
}

/** Terms with the ratio to the n = 2 cos term (zero where that term vanishes). */
export function relativeTerms(terms: readonly MultipoleTerm[]): BesideMultipoles['terms'] {
  const a2 = terms.find((t) => t.n === 2)?.cos_v ?? 0;
  return terms.map((t) => ({ ...t, relative_cos: a2 !== 0 ? t.cos_v / a2 : 0, relative_sin: a2 !== 0 ? t.sin_v / a2 : 0 }));
}
