// Validated `electrodes` entry → the SI field problem of sim/fields/problem.ts. Every error names
// the key path inside the stage ("electrodes.1.shapes.0.circle.center"), so the loader prints
// file:line:key.

import type { AxialShape, Electrode, FieldProblem, GridSpec, GridSymmetry, MirrorPlane, PlanarShape, Shape, SolidShape, Vec2, Vec3 } from '../../fields/problem.js';

type Raw = Record<string, any>;
type Path = (string | number)[];
export type Fail = (key: Path, message: string) => never;

function vec2(v: number[], path: Path, fail: Fail): Vec2 {
  if (v.length !== 2) fail(path, `expects two lengths [x, y] such as [8 mm, 0 mm], got ${v.length}`);
  return [v[0], v[1]];
}

function vec3(v: number[], path: Path, fail: Fail): Vec3 {
  if (v.length !== 3) fail(path, `expects three lengths [x, y, z] such as [0 mm, 0 mm, 5 mm], got ${v.length}`);
  return [v[0], v[1], v[2]];
}

function planar(s: Raw, path: Path, fail: Fail): PlanarShape | undefined {
  const p = [...path, s.kind];
  switch (s.kind) {
    case 'circle': return { kind: 'circle', center: vec2(s.center, [...p, 'center'], fail), radius: s.radius };
    case 'rectangle': {
      const min = vec2(s.min, [...p, 'min'], fail), max = vec2(s.max, [...p, 'max'], fail);
      if (!(max[0] > min[0] && max[1] > min[1])) fail([...p, 'max'], 'must lie above min in x and y (lengths such as [2 mm, 1 mm])');
      return { kind: 'rectangle', min, max };
    }
    case 'polygon': return { kind: 'polygon', points: (s.points as number[][]).map((q, i) => vec2(q, [...p, 'points', i], fail)) };
    case 'hyperbola':
      if (!(s.truncate > s.vertex)) fail([...p, 'truncate'], `must exceed the vertex distance (${(s.vertex * 1e3).toPrecision(4)} mm)`);
      return { kind: 'hyperbola', vertex: s.vertex, angle: s.angle ?? 0, truncate: s.truncate };
  }
  return undefined;
}

function axial(s: Raw, path: Path, fail: Fail): AxialShape | undefined {
  const p = [...path, s.kind];
  switch (s.kind) {
    case 'tube':
      if (!(s.outer_radius > s.inner_radius)) fail([...p, 'outer_radius'], 'must exceed inner_radius (a length such as 5 mm)');
      if (!(s.to > s.from)) fail([...p, 'to'], 'must lie beyond from (a length such as 20 mm)');
      return { kind: 'tube', innerRadius: s.inner_radius, outerRadius: s.outer_radius, from: s.from, to: s.to };
    case 'disc': {
      const hole = s.hole ?? 0;
      if (!(s.radius > hole)) fail([...p, 'radius'], 'must exceed the hole radius (a length such as 10 mm)');
      return { kind: 'disc', at: s.at, thickness: s.thickness, radius: s.radius, hole };
    }
    case 'polygon': {
      const points = (s.points as number[][]).map((q, i) => vec2(q, [...p, 'points', i], fail));
      points.forEach((q, i) => { if (q[0] < 0) fail([...p, 'points', i], 'r must not be negative on an axial grid (points are [r, z])'); });
      return { kind: 'polygon', points };
    }
    case 'hyperboloid': {
      const ring = s.sheet === 'ring';
      if (!ring && s.side === undefined) fail([...p, 'side'], 'is required for a cap: entrance, exit or both');
      if (s.side === 'both' && (ring || path.includes('revolve'))) fail([...p, 'side'], ring ? 'both is for a cap sheet; a ring has no side' : 'both is for a cap on an axial grid; give a revolve shape per cap (entrance, exit)');
      if (ring && !(s.truncate > s.vertex)) fail([...p, 'truncate'], `must exceed the vertex radius (${(s.vertex * 1e3).toPrecision(4)} mm)`);
      if (ring && s.shift !== undefined) fail([...p, 'shift'], 'moves a cap out from the centre; a ring has none (give it on the cap sheet)');
      const side = s.side === 'entrance' ? -1 : 1;
      // A shifted cap keeps its hyperboloid about its own centre, moved out by the shift: apex at
      // center ± (vertex + shift). (A larger vertex instead stays a level set of r² − 2z², a pure
      // quadrupole of another z0, so it stretches nothing.)
      return { kind: 'hyperboloid', sheet: s.sheet, vertex: s.vertex, center: s.center + (ring ? 0 : side * (s.shift ?? 0)), truncate: s.truncate, side, hole: s.hole ?? 0 };
    }
  }
  return undefined;
}

function solid(s: Raw, path: Path, fail: Fail): SolidShape | undefined {
  const p = [...path, s.kind];
  switch (s.kind) {
    case 'cylinder': {
      const a = s.axis ? vec3(s.axis, [...p, 'axis'], fail) : [0, 0, 1] as const;
      const n = Math.hypot(a[0], a[1], a[2]);
      if (!(n > 0)) fail([...p, 'axis'], 'must not be the zero vector (a direction such as [0, 0, 1])');
      if (!(s.to > s.from)) fail([...p, 'to'], 'must lie beyond from (a length such as 20 mm)');
      return { kind: 'cylinder', base: s.base ? vec3(s.base, [...p, 'base'], fail) : [0, 0, 0], axis: [a[0] / n, a[1] / n, a[2] / n], radius: s.radius, from: s.from, to: s.to };
    }
    case 'box': {
      const min = vec3(s.min, [...p, 'min'], fail), max = vec3(s.max, [...p, 'max'], fail);
      if (!(max[0] > min[0] && max[1] > min[1] && max[2] > min[2])) fail([...p, 'max'], 'must lie above min in x, y and z');
      return { kind: 'box', min, max };
    }
    case 'sphere': return { kind: 'sphere', center: vec3(s.center, [...p, 'center'], fail), radius: s.radius };
    case 'extrude': {
      if (!(s.to > s.from)) fail([...p, 'to'], 'must lie beyond from (a length such as 20 mm)');
      const inner = planar(s.shape, [...p, 'shape'], fail)!;
      return { kind: 'extrude', shape: inner, from: s.from, to: s.to };
    }
    case 'revolve': return { kind: 'revolve', shape: axial(s.shape, [...p, 'shape'], fail)!, center: s.center ? vec2(s.center, [...p, 'center'], fail) : [0, 0] };
  }
  return undefined;
}

const ALLOWED: Record<GridSymmetry, string> = {
  planar: 'circle, rectangle, polygon or hyperbola',
  axial: 'tube, disc, polygon or hyperboloid',
  none: 'cylinder, box, sphere, extrude or revolve',
};

/** One shape of the grid's kind, or an error naming the shapes that grid takes. */
export function resolveShape(sym: GridSymmetry, s: Raw, path: Path, fail: Fail): Shape {
  const out = sym === 'planar' ? planar(s, path, fail) : sym === 'axial' ? axial(s, path, fail) : solid(s, path, fail);
  if (out === undefined) fail([...path, s.kind], `is not a shape of ${sym === 'none' ? 'a 3D (symmetry: none)' : sym === 'axial' ? 'an axial' : 'a planar'} grid; expected ${ALLOWED[sym]}`);
  return out;
}

/** The grid block in SI, with the keys its symmetry needs. */
export function resolveGrid(g: Raw, length: number, fail: Fail): GridSpec {
  const sym = g.symmetry as GridSymmetry;
  const need = (key: string, what: string) => { if (g[key] === undefined) fail(['grid', key], `is required for symmetry ${sym} (${what}, a length such as 10 mm)`); };
  if (sym === 'axial') need('radius', 'r spans 0..radius');
  else need('half_width', 'x and y span ±half_width');
  const mirror = (g.mirror ?? []) as MirrorPlane[];
  mirror.forEach((m, i) => {
    if (mirror.indexOf(m) !== i) fail(['grid', 'mirror', i], `'${m}' is given twice`);
    if (sym === 'axial' && m !== 'z') fail(['grid', 'mirror', i], `an axial grid is symmetric in r already; only z may be mirrored, got '${m}'`);
    if (sym === 'planar' && m === 'z') fail(['grid', 'mirror', i], 'a planar grid has no z to mirror; expected x or y');
  });
  const extent = sym === 'axial' ? g.radius : g.half_width;
  if (!(g.spacing < extent / 4)) fail(['grid', 'spacing'], `must be well below the grid's ${sym === 'axial' ? 'radius' : 'half_width'} (${(extent * 1e3).toPrecision(4)} mm), got ${(g.spacing * 1e3).toPrecision(4)} mm`);
  const out: GridSpec = { symmetry: sym, spacing: g.spacing, length, mirror };
  if (g.half_width !== undefined) out.halfWidth = g.half_width;
  if (g.radius !== undefined) out.radius = g.radius;
  if (g.max_iterations !== undefined) out.maxIterations = g.max_iterations;
  if (g.reference_radius !== undefined) {
    if (!(g.reference_radius < extent)) fail(['grid', 'reference_radius'], `must lie inside the grid (below ${(extent * 1e3).toPrecision(4)} mm)`);
    out.referenceRadius = g.reference_radius;
  } else if (sym === 'planar') {
    fail(['grid', 'reference_radius'], 'is required for symmetry planar (the circle the multipoles are fitted on, a length such as 3 mm)');
  }
  return out;
}

/** The whole entry's field problem. */
export function resolveProblem(s: Raw, fail: Fail): FieldProblem {
  const grid = resolveGrid(s.grid, s.length, fail);
  const names = new Set<string>();
  const electrodes: Electrode[] = (s.electrodes as Raw[]).map((e, i): Electrode => {
    if (names.has(e.name)) fail(['electrodes', i, 'name'], `'${e.name}' names two electrodes; give each its own name`);
    names.add(e.name);
    const pot = e.potential ?? {};
    return {
      name: e.name,
      potential: { dc: pot.dc ?? 0, rf: pot.rf ?? 0, aux: pot.aux ?? 0 },
      // A cap of `side: both` is the pair of caps about its centre (one key moves both: a stretch).
      shapes: (e.shapes as Raw[]).flatMap((sh, j) => (sh.kind === 'hyperboloid' && sh.side === 'both' && sh.sheet === 'cap'
        ? (['entrance', 'exit'] as const).map((side) => resolveShape(grid.symmetry, { ...sh, side }, ['electrodes', i, 'shapes', j], fail))
        : [resolveShape(grid.symmetry, sh, ['electrodes', i, 'shapes', j], fail)])),
      holes: ((e.holes ?? []) as Raw[]).map((sh, j) => resolveShape(grid.symmetry, sh, ['electrodes', i, 'holes', j], fail)),
    };
  });
  return { grid, electrodes };
}
