// What the renderer draws for a stage: shapes named by the electrode they are, not by the stage
// kind, so a new kind reuses them (render/scene3d/electrodes.ts builds each shape).

export interface OutlinePart {
  /**
   * rod-set: four hyperbolic (or round) rods of inscribed radius r0 along the stage;
   * hyperbolic-trap: ring and end caps of r0, z0 with cap holes of `aperture`;
   * tube: a tube outline of the stage's aperture; ring-stack: guard rings with an entrance grid
   * (and a back plate when closed); grid-gap: entrance and exit grids.
   */
  shape: 'rod-set' | 'hyperbolic-trap' | 'tube' | 'ring-stack' | 'grid-gap';
  /**
   * Radius the electrodes reach from the axis as a multiple of the stage's r0 (sizes the tubes
   * drawn for stages without an aperture).
   */
  reachR0?: number;
  /** rod-set: number of rods, 2n (default 4; more draws the round rods of a multipole guide). */
  rods?: number;
}

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
