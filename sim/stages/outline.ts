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
}
