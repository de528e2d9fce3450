// Column names and Arrow types of the run-folder tables. The names are part of the file format
// (issue 3, "Run folder") and are read from Python/R/Julia: do not rename. SI units, energies in eV.

export type ColumnKind = 'int32' | 'float64' | 'utf8';

export interface ColumnSpec {
  readonly name: string;
  readonly kind: ColumnKind;
  /** Missing from run folders written before the column existed: read back as NaN. */
  readonly since?: string;
}

const i = (name: string): ColumnSpec => ({ name, kind: 'int32' });
const f = (name: string): ColumnSpec => ({ name, kind: 'float64' });
const s = (name: string): ColumnSpec => ({ name, kind: 'utf8' });

/** ions.arrow: one row per ion, rows in ion order. */
export const ION_COLUMNS: readonly ColumnSpec[] = [
  i('ion'), i('population'), f('mz'), i('charge'),
  f('x0'), f('y0'), f('z0'), f('vx0'), f('vy0'), f('vz0'),
  s('fate'), f('end_time'),
  f('end_x'), f('end_y'), f('end_z'), f('end_vx'), f('end_vy'), f('end_vz'),
  f('end_ke_ev'), i('end_stage'), f('collisions'),
  // RF phase Ω(t + τ) + φ mod 2π, rad, as the ion entered its first RF stage (NaN: it never did).
  { name: 'entry_rf_phase', kind: 'float64', since: 'issue 11' },
];

/** trajectories.arrow: recorded points; the points of one ion contiguous, ions in index order. */
export const TRAJECTORY_COLUMNS: readonly ColumnSpec[] = [
  i('ion'), f('t'), f('x'), f('y'), f('z'), f('vx'), f('vy'), f('vz'),
];

/** history.arrow: ensemble averages against time (gas cooling). */
export const HISTORY_COLUMNS: readonly ColumnSpec[] = [
  f('t'), f('n_alive'), f('mean_ke_ev'), f('mean_ke_x_ev'), f('mean_ke_y_ev'), f('mean_ke_z_ev'),
  f('rms_radius_m'), f('rms_z_m'),
];

/** history_species.arrow: the history means per population (runs of several populations). */
export const SPECIES_HISTORY_COLUMNS: readonly ColumnSpec[] = [
  i('population'), f('t'), f('n_alive'), f('mean_ke_ev'), f('rms_radius_m'), f('rms_z_m'),
];

export const FATES = ['detected', 'hit', 'missed', 'returned', 'alive'] as const;
export type FateName = (typeof FATES)[number];

type NumericInput = ArrayLike<number>;

/** Columns of ions.arrow as given to the writer. `fate` may be names or engine Fate codes. */
export interface IonColumnsInput {
  ion: NumericInput; population: NumericInput; mz: NumericInput; charge: NumericInput;
  x0: NumericInput; y0: NumericInput; z0: NumericInput;
  vx0: NumericInput; vy0: NumericInput; vz0: NumericInput;
  fate: ArrayLike<string> | Int8Array;
  end_time: NumericInput;
  end_x: NumericInput; end_y: NumericInput; end_z: NumericInput;
  end_vx: NumericInput; end_vy: NumericInput; end_vz: NumericInput;
  end_ke_ev: NumericInput;
  end_stage: NumericInput;
  collisions: NumericInput;
  /** Optional for writers with no RF stages to report: written as NaN when left out. */
  entry_rf_phase?: NumericInput;
}

/** Columns of ions.arrow as read back. */
export interface IonColumns {
  ion: Int32Array; population: Int32Array; mz: Float64Array; charge: Int32Array;
  x0: Float64Array; y0: Float64Array; z0: Float64Array;
  vx0: Float64Array; vy0: Float64Array; vz0: Float64Array;
  fate: FateName[];
  end_time: Float64Array;
  end_x: Float64Array; end_y: Float64Array; end_z: Float64Array;
  end_vx: Float64Array; end_vy: Float64Array; end_vz: Float64Array;
  end_ke_ev: Float64Array;
  end_stage: Int32Array;
  collisions: Float64Array;
  entry_rf_phase: Float64Array;
}

export interface TrajectoryColumnsInput {
  ion: NumericInput; t: NumericInput;
  x: NumericInput; y: NumericInput; z: NumericInput;
  vx: NumericInput; vy: NumericInput; vz: NumericInput;
}

export interface TrajectoryColumns {
  ion: Int32Array; t: Float64Array;
  x: Float64Array; y: Float64Array; z: Float64Array;
  vx: Float64Array; vy: Float64Array; vz: Float64Array;
}

export interface HistoryColumnsInput {
  t: NumericInput; n_alive: NumericInput; mean_ke_ev: NumericInput;
  mean_ke_x_ev: NumericInput; mean_ke_y_ev: NumericInput; mean_ke_z_ev: NumericInput;
  rms_radius_m: NumericInput; rms_z_m: NumericInput;
}

/** history_species.arrow rows: one per (population, sample time), population-major. */
export interface SpeciesHistoryColumns {
  population: Int32Array; t: Float64Array; n_alive: Float64Array; mean_ke_ev: Float64Array;
  rms_radius_m: Float64Array; rms_z_m: Float64Array;
}

export interface HistoryColumns {
  t: Float64Array; n_alive: Float64Array; mean_ke_ev: Float64Array;
  mean_ke_x_ev: Float64Array; mean_ke_y_ev: Float64Array; mean_ke_z_ev: Float64Array;
  rms_radius_m: Float64Array; rms_z_m: Float64Array;
}
