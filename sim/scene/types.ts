// A scene resolved to SI: what the engine runs. Built from YAML by load.ts; also stored verbatim in
// every run folder's provenance, so the renderer can redraw electrodes and stability points.

export interface RfDrive {
  /** Zero-to-peak amplitude, V, measured rod (or ring) to ground. */
  amplitude: number;
  /** Frequency, Hz. */
  frequency: number;
  /** Phase of the drive at t = 0, rad. */
  phase: number;
  /** Optional linear amplitude ramp: amplitude(t) = amplitude + rate·t until `to` is reached. */
  ramp?: { to: number; over: number };
}

interface StageBase {
  /** Index of the scene-file entry this stage came from (a source gives two stages). */
  sceneIndex?: number;
  /** Position of the stage entrance and exit along z, m (filled in by the loader). */
  zStart: number;
  zEnd: number;
  length: number;
  /** Optional gas filling this stage only. */
  gas?: GasSettings;
}

/** Ideal hyperbolic quadrupole; rods at ±(dc + amplitude·cos(2π f t + phase)). */
export interface QuadrupoleStage extends StageBase {
  type: 'quadrupole';
  r0: number;
  rf: RfDrive;
  dc: number;
}

/** Field-free region; `aperture` (m) is the tube radius, Infinity when not given. */
export interface DriftStage extends StageBase {
  type: 'drift';
  aperture: number;
  /** Reflectron instruments: an ion leaving back through this stage's entrance hits the detector. */
  detectReturning?: boolean;
}

/** Uniform axial field: the potential falls by `voltage` (V) from entrance to exit. */
export interface AccelerateStage extends StageBase {
  type: 'accelerate';
  voltage: number;
  aperture: number;
  /** A closed far end (reflectron back plate): an ion reaching it is lost. */
  closed?: boolean;
  /** What the scene called it: a plain gap, a reflectron, or a region of a two-field source. */
  role?: 'gap' | 'reflectron' | 'source-extraction' | 'source-acceleration';
}

/** Ideal 3D RF trap: ring at dc + amplitude·cos(...), end caps grounded; centred in the stage. */
export interface TrapStage extends StageBase {
  type: 'trap';
  r0: number;
  z0: number;
  rf: RfDrive;
  dc: number;
  /** Radius of the holes in the end caps, m: an ion crossing an end cap within it leaves the trap. */
  aperture: number;
  /** Supplementary dipolar AC between the end caps (zero-to-peak cap-to-cap voltage, Hz, rad). */
  aux?: { amplitude: number; frequency: number; phase: number };
}

export type Stage = QuadrupoleStage | DriftStage | AccelerateStage | TrapStage;

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

export interface Population {
  mz: number;
  charge: number;
  count: number;
  position: { x: number; y: number; z: number; spread: number; spreadZ: number };
  /** Kinetic energy at the start, eV, and its Gaussian sigma, eV. */
  energy: number;
  energySpread: number;
  /** Gaussian sigma of the direction about +z, rad. */
  angleSpread: number;
  direction: 'axial' | 'isotropic';
  /** 'uniform', or a fixed RF phase at the ion's start, rad. */
  rfPhase: 'uniform' | number;
}

export interface RunSettings {
  integrator: 'rk4' | 'dopri5';
  stepsPerCycle: number;
  /** Relative tolerance of the adaptive integrator. */
  tolerance: number;
  maxTime: number;
  recordEvery: number;
  /** Spacing of the ensemble history (mean energy, cloud size), s. */
  historyEvery: number;
  /** Step for stages without RF when they must be stepped (gas), s. */
  stepNoRf: number;
}

export interface Scene {
  name: string;
  seed: number;
  stages: Stage[];
  ions: Population[];
  run: RunSettings;
  gas?: GasSettings;
  spaceCharge?: { method: 'direct' | 'tree'; weight: number; softening?: number; theta?: number };
}
