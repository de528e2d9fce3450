// How a stage takes part in a coupled (space-charge) run, where every ion advances together on one
// step (sim/engine/coupled-flight.ts). The stepper splits each step (Strang splitting; E. Hairer,
// C. Lubich, G. Wanner, Geometric Numerical Integration, 2nd ed., Springer 2006, Sect. II.5):
//   half kick by the cloud's Coulomb field and the stage fields given as `kick`,
//   flight over the step: straight, or under the stage's uniform axial field in closed form,
//   half kick again.
// A uniform stage's field is thus integrated exactly (its crossing times too), a smooth RF field
// by Störmer–Verlet. Coordinates are stage-local as in field-model.ts (z from the stage's zRef).

import type { FieldModel } from './field-model.js';

/** Where a stage-local point lies after a flight. */
export const Place = {
  /** In the stage's field. */
  inside: 0,
  /** In a field-free part of the stage (past a trap's end cap, through its hole). */
  free: 1,
  /** On or beyond an electrode: the ion is lost there. */
  hit: 2,
  /** Through an electrode's opening onto a detector (a linear trap's slotted x rods): detected. */
  detected: 3,
} as const;
export type PlaceCode = (typeof Place)[keyof typeof Place];

export interface StageCoupling {
  /** The field applied in the kicks (ions placed `inside` only), or null: the flight carries it. */
  readonly kick: FieldModel | null;
  /** With no kick field: the uniform axial field E_z inside the stage, V/m (0: field-free). */
  readonly flightEz: number;
  /** RF frequency of the stage, Hz, when it has one (the coupled step divides its period). */
  readonly rfHz?: number;
  /** Where the stage-local point (x, y, z) lies. */
  place(x: number, y: number, z: number): PlaceCode;
  /**
   * Whether an ion crossing the stage's entrance plane (exit = false) or exit plane (exit = true)
   * at (x, y), in either direction, strikes a plate there (a filter's entrance and exit holes).
   */
  plateBlocks(x: number, y: number, exit: boolean): boolean;
}
