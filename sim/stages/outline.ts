// What the renderer draws for a stage: shapes named by the electrode they are, not by the stage
// kind, so a new kind reuses them (render/scene3d/electrodes.ts builds each shape).

export interface OutlinePart {
  /**
   * rod-set: four hyperbolic (or round) rods of inscribed radius r0 along the stage;
   * hyperbolic-trap: ring and end caps of r0, z0 with cap holes of `aperture`;
   * tube: a tube outline of the stage's aperture; ring-stack: guard rings with an entrance grid
   * (and a back plate when closed); grid-gap: entrance and exit grids.
   */
  shape: 'rod-set' | 'hyperbolic-trap' | 'tube' | 'ring-stack' | 'grid-gap' | 'solids';
  /**
   * Radius the electrodes reach from the axis as a multiple of the stage's r0 (sizes the tubes
   * drawn for stages without an aperture).
   */
  reachR0?: number;
  /** rod-set: number of rods, 2n (default 4; more draws the round rods of a multipole guide). */
  rods?: number;
  /** solids: the electrodes' own shapes as solids to draw (an electrodes stage). */
  solids?: readonly SolidPart[];
}

/**
 * One solid of an electrode as the renderer draws it, stage-local SI (z from the stage entrance);
 * `electrode` indexes the stage's electrodes, `sign` is the sign of its dc + rf volts (colour).
 * prism: a closed (x, y) outline with optional hole outlines, over z from..to; lathe: a closed
 * (r, z) profile revolved about the line x, y = center; box, cylinder (base point, unit axis,
 * extent from..to along it) and ball as they are.
 */
export type SolidPart = { electrode: number; sign: -1 | 0 | 1 } & (
  | { kind: 'prism'; outline: readonly (readonly [number, number])[]; holes: readonly (readonly (readonly [number, number])[])[]; from: number; to: number }
  | { kind: 'lathe'; profile: readonly (readonly [number, number])[]; center: readonly [number, number] }
  | { kind: 'box'; min: readonly [number, number, number]; max: readonly [number, number, number] }
  | { kind: 'cylinder'; base: readonly [number, number, number]; axis: readonly [number, number, number]; radius: number; from: number; to: number }
  | { kind: 'ball'; center: readonly [number, number, number]; radius: number });

/** A point a label's leader line may end at, on one electrode of the stage. */
export interface LabelAnchor {
  /**
   * Distance from the axis, m; with `rim`, a fraction of the radius the renderer draws the
   * electrode at (the stage's aperture, or the tube radius it uses when there is none).
   */
  r: number;
  rim?: boolean;
  /** Along the stage from its entrance, m. */
  z: number;
  /** Azimuths (rad, atan2(y, x)) the electrode sits at; undefined when it goes all round. */
  azimuths?: readonly number[];
}

/** The name and voltage of one electrode (or set) as the figure labels it. */
export interface ElectrodeLabel {
  /** E.g. "rods x +(138 V + 832 V RF)", "end caps 0 V", "reflectron 3.3 kV". */
  text: string;
  /** Where the leader line may end; the renderer picks the one best in view. */
  at: readonly LabelAnchor[];
}
