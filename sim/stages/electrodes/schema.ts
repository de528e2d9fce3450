// Scene-file keys of an `electrodes` stage: the grid, the electrodes and their shapes, each shape
// a one-key mapping (`circle: { center: [8.52 mm, 0 mm], radius: 4.52 mm }`) with its units.
// The box edge of the grid (±half_width in x and y, r = radius, z = 0 and the stage length) is
// grounded, 0 V, unless an electrode covers it; a mirror plane is a symmetry plane instead (zero
// normal field), and the axis of an axial grid is no boundary at all. README "Scene files" says so
// to users.

import type { Field } from '../../scene/schema.js';

const LEN = { kind: 'quantity', dim: 'length' } as const;
const POS = { kind: 'quantity', dim: 'length', positive: true } as const;
const NONNEG = { kind: 'quantity', dim: 'length', nonNegative: true } as const;
/** A point: two or three lengths, e.g. [8.52 mm, 0 mm]. */
const POINT: Field = { kind: 'list', item: LEN, minItems: 2 };

type Variant = { fields: Record<string, Field>; required?: readonly string[] };

/** Cross-section shapes (planar grids; extruded in 3D), points (x, y). */
export const PLANAR_SHAPES: Record<string, Variant> = {
  circle: { fields: { center: POINT, radius: POS }, required: ['center', 'radius'] },
  rectangle: { fields: { min: POINT, max: POINT }, required: ['min', 'max'] },
  polygon: { fields: { points: { kind: 'list', item: POINT, minItems: 3 } }, required: ['points'] },
  hyperbola: { fields: { vertex: POS, angle: { kind: 'quantity', dim: 'angle' }, truncate: POS }, required: ['vertex', 'truncate'] },
};

/** Shapes of an axial grid, points (r, z), rotationally symmetric about z. */
export const AXIAL_SHAPES: Record<string, Variant> = {
  tube: { fields: { inner_radius: NONNEG, outer_radius: POS, from: LEN, to: LEN }, required: ['inner_radius', 'outer_radius', 'from', 'to'] },
  disc: { fields: { at: LEN, thickness: POS, radius: POS, hole: NONNEG }, required: ['at', 'thickness', 'radius'] },
  polygon: PLANAR_SHAPES.polygon,
  hyperboloid: {
    fields: {
      sheet: { kind: 'enum', values: ['ring', 'cap'] }, vertex: POS, center: LEN, truncate: POS,
      side: { kind: 'enum', values: ['entrance', 'exit', 'both'] }, hole: NONNEG,
      // A cap moved out along z by `shift` from the centre, its shape kept: the trade's stretched cap spacing.
      shift: NONNEG,
    },
    required: ['sheet', 'vertex', 'center', 'truncate'],
  },
};

const planarChoice: Field = { kind: 'choice', variants: PLANAR_SHAPES };
const axialChoice: Field = { kind: 'choice', variants: AXIAL_SHAPES };

/** Shapes of a full 3D grid, points (x, y, z); planar and axial shapes enter extruded or revolved. */
export const SOLID_SHAPES: Record<string, Variant> = {
  cylinder: { fields: { base: POINT, axis: { kind: 'list', item: { kind: 'number' }, minItems: 3 }, radius: POS, from: LEN, to: LEN }, required: ['radius', 'from', 'to'] },
  box: { fields: { min: POINT, max: POINT }, required: ['min', 'max'] },
  sphere: { fields: { center: POINT, radius: POS }, required: ['center', 'radius'] },
  extrude: { fields: { shape: planarChoice, from: LEN, to: LEN }, required: ['shape', 'from', 'to'] },
  revolve: { fields: { shape: axialChoice, center: POINT }, required: ['shape'] },
};

/** Every shape name of any grid (polygon serves planar and axial grids): the grid picks the meaning. */
export const SHAPE_FIELD: Field = { kind: 'choice', variants: { ...PLANAR_SHAPES, ...AXIAL_SHAPES, ...SOLID_SHAPES } };

export const GRID_FIELD: Field = {
  kind: 'object',
  fields: {
    symmetry: { kind: 'enum', values: ['planar', 'axial', 'none'] },
    spacing: POS,
    half_width: POS,
    radius: POS,
    reference_radius: POS,
    mirror: { kind: 'list', item: { kind: 'enum', values: ['x', 'y', 'z'] } },
    // Krylov iterations allowed per unit solution before the solve is refused as not converging.
    max_iterations: { kind: 'number', integer: true, min: 1 },
  },
  required: ['symmetry', 'spacing'],
};

export const ELECTRODE_FIELD: Field = {
  kind: 'object',
  fields: {
    name: { kind: 'string' },
    potential: {
      kind: 'object',
      fields: { dc: { kind: 'quantity', dim: 'voltage' }, rf: { kind: 'number' }, aux: { kind: 'number' } },
    },
    shapes: { kind: 'list', item: SHAPE_FIELD, minItems: 1 },
    holes: { kind: 'list', item: SHAPE_FIELD },
  },
  required: ['name', 'shapes'],
};
