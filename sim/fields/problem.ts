// What an electrode field solve is given and what it returns: the contract between the scene's
// `electrodes` stages (sim/stages/electrodes, which turn YAML into these SI shapes) and the Laplace
// solver in this folder. Stage-local SI coordinates throughout: planar grids use (x, y) of the
// cross-section; axial grids use (r, z) with z from the stage entrance; 3D grids use (x, y, z) with
// z from the stage entrance.

export type GridSymmetry = 'planar' | 'axial' | 'none';

/** A symmetry plane the grid is cut at (Neumann condition there): x = 0, y = 0, or z = length / 2. */
export type MirrorPlane = 'x' | 'y' | 'z';

/** The grid a stage's field is solved on. The box edge is grounded unless an electrode covers it. */
export interface GridSpec {
  symmetry: GridSymmetry;
  /** Node spacing, m, the same along every axis. */
  spacing: number;
  /** planar and none: x and y span ±halfWidth (before mirroring), m. */
  halfWidth?: number;
  /** axial: r spans [0, radius], m. */
  radius?: number;
  /** axial and none: z spans [0, length], m; planar: the length the cross-section is extruded over. */
  length: number;
  mirror: readonly MirrorPlane[];
  /** planar: radius of the circle the multipole content is fitted on, m. */
  referenceRadius?: number;
  /** Krylov iterations per unit solution before the solve counts as not converging (solve.ts default). */
  maxIterations?: number;
}

export type Vec2 = readonly [number, number];
export type Vec3 = readonly [number, number, number];

/** Cross-section shapes (planar grids, or extruded in 3D): points are (x, y). */
export type PlanarShape =
  | { kind: 'circle'; center: Vec2; radius: number }
  | { kind: 'rectangle'; min: Vec2; max: Vec2 }
  | { kind: 'polygon'; points: readonly Vec2[] }
  /**
   * A truncated hyperbolic rod: along the unit direction (cos angle, sin angle) with u the
   * coordinate along it and v across it, the solid u ≥ sqrt(vertex² + v²), u ≤ truncate
   * (x² − y² = r0² for the +x rod of a quadrupole with vertex = r0, angle = 0).
   */
  | { kind: 'hyperbola'; vertex: number; angle: number; truncate: number };

/** Shapes of an axial (r, z) grid, rotationally symmetric about the z axis: points are (r, z). */
export type AxialShape =
  | { kind: 'tube'; innerRadius: number; outerRadius: number; from: number; to: number }
  /** A plate across the axis at z = at, of the given thickness, outer radius and an optional hole. */
  | { kind: 'disc'; at: number; thickness: number; radius: number; hole: number }
  | { kind: 'polygon'; points: readonly Vec2[] }
  /**
   * A truncated hyperboloid about z = center. `ring`: r² − 2(z − center)² ≥ vertex², r ≤ truncate
   * (vertex = r0). `cap`: 2(z − center)² − r² ≥ 2·vertex² on the side sign(z − center) = side,
   * r ≤ truncate, with a hole of radius `hole` about the axis (vertex = z0).
   */
  | { kind: 'hyperboloid'; sheet: 'ring' | 'cap'; vertex: number; center: number; truncate: number; side: 1 | -1; hole: number }
  /** A solid sphere centred on the axis at z = center (the axial twin of the 3D `sphere`). */
  | { kind: 'ball'; center: number; radius: number };

/** Shapes of a full 3D grid: points are (x, y, z). */
export type SolidShape =
  /** A round cylinder: base point, unit axis, radius, and its extent from..to along the axis. */
  | { kind: 'cylinder'; base: Vec3; axis: Vec3; radius: number; from: number; to: number }
  | { kind: 'box'; min: Vec3; max: Vec3 }
  | { kind: 'sphere'; center: Vec3; radius: number }
  /** A cross-section shape extruded along z over [from, to]. */
  | { kind: 'extrude'; shape: PlanarShape; from: number; to: number }
  /** An axial shape revolved about the line x = center[0], y = center[1] parallel to z. */
  | { kind: 'revolve'; shape: AxialShape; center: Vec2 };

export type Shape = PlanarShape | AxialShape | SolidShape;

/** Volts on an electrode: dc + rf × the stage's RF drive V cos(Ωt + φ) + aux × its supplementary AC. */
export interface ElectrodePotential {
  dc: number;
  rf: number;
  aux: number;
}

/** One electrode: the union of its shapes minus the union of its holes. */
export interface Electrode {
  name: string;
  potential: ElectrodePotential;
  shapes: readonly Shape[];
  holes: readonly Shape[];
}

export interface FieldProblem {
  grid: GridSpec;
  electrodes: readonly Electrode[];
}

/**
 * The grid as solved: node (i, j, k) sits at origin + spacing·(i, j, k), stage-local SI. A mirrored
 * grid holds the half on the positive side of each mirror plane (x ≥ 0, y ≥ 0, z ≥ length / 2; node
 * index 0 lies on the plane); the other half is its mirror image. When an extent is not a whole number
 * of spacings the last node lies just beyond the box face (and holds the face's value).
 */
export interface SolvedGrid {
  symmetry: GridSymmetry;
  /** Coordinates of node (0, 0, 0): planar (x, y, 0), axial (r = 0, z, 0), none (x, y, z), m. */
  origin: Vec3;
  spacing: number;
  /** Node counts along axes 0, 1, 2 (planar [nx, ny, 1], axial [nr, nz, 1], none [nx, ny, nz]). */
  shape: Vec3;
  mirror: readonly MirrorPlane[];
}

export interface SolveStats {
  /** Per unit solution: Krylov iterations, final relative residual, mean contraction per cycle. */
  iterations: number[];
  residual: number[];
  contraction: number[];
  wallSeconds: number;
  /** Peak bytes the solve held (grids, Krylov vectors, multigrid levels). */
  memoryBytes: number;
}

export interface FieldSolution {
  grid: SolvedGrid;
  /**
   * One unit solution per electrode, in problem order: that electrode at 1 V, all else at 0 V.
   * Each may be a view into a larger buffer (mind byteOffset when writing its bytes).
   */
  units: Float64Array[];
  /** Per node, index i + nx·(j + ny·k): the electrode the node lies inside, or -1 where free. */
  inside: Int16Array;
  stats: SolveStats;
}

/** Bad geometry or grid: `key` is the key path inside the stage (e.g. "electrodes.1.shapes.0"). */
export class FieldInputError extends Error {
  override name = 'FieldInputError';
  constructor(readonly key: string, message: string) {
    super(message);
  }
}
