// Plane maps of a solved field for figures: the superposed potential Σ V_k φ_k on one plane of
// nodes, the grid unfolded across its mirror planes (and an axial grid across its axis, r → ±r)
// so the picture shows the whole electrode set.

import type { FieldProblem, FieldSolution, SolvedGrid } from './problem.js';
import { electrodeSets } from './operator.js';

export interface MapAxis {
  /** Coordinate name: x, y, z or r. */
  name: string;
  coords: Float64Array;
}

export interface FieldMap {
  u: MapAxis;
  v: MapAxis;
  /** Potential per node, u fastest, V. */
  values: Float64Array;
  /** Electrode index per node (−1 free). */
  inside: Int16Array;
  /** The plane, e.g. "y = 0" or "z = 20 mm", for captions. */
  plane: string;
  /**
   * The electrode at a point (u, v) of the plane from the shapes themselves (−1 free), folded onto
   * the solved half across mirror planes as the solver sees it: figures draw electrode outlines at
   * their true place instead of as node staircases. Absent when fieldMap was given no problem.
   */
  electrodeAt?: (u: number, v: number) => number;
}

/** Coordinates of axis `ai` after unfolding, with the stored index each comes from. */
export function unfoldAxis(grid: SolvedGrid, ai: number): { coords: Float64Array; index: Int32Array } {
  const n = grid.shape[ai], h = grid.spacing, o = grid.origin[ai];
  const m = new Set(grid.mirror);
  const zAxis = grid.symmetry === 'axial' ? 1 : 2;
  let low = false, high = false;
  if (grid.symmetry === 'axial' && ai === 0) low = true;
  else if (grid.symmetry !== 'axial' && ai === 0 && m.has('x')) low = true;
  else if (grid.symmetry !== 'axial' && ai === 1 && m.has('y')) low = true;
  else if (ai === zAxis && grid.symmetry !== 'planar' && m.has('z')) {
    if (Math.abs(o) < h / 2) high = true; else low = true;
  }
  const idx: number[] = [];
  if (low) for (let i = n - 1; i >= 1; i--) idx.push(-i);
  for (let i = 0; i < n; i++) idx.push(i);
  if (high) for (let i = n - 2; i >= 0; i--) idx.push(2 * (n - 1) - i);
  const coords = Float64Array.from(idx, (i) => o + i * h);
  const index = Int32Array.from(idx, (i) => (i < 0 ? -i : i > n - 1 ? 2 * (n - 1) - i : i));
  return { coords, index };
}

/**
 * The potential on a plane of nodes with the electrodes at `volts`: planar grids give x–y,
 * axial grids z–r (r unfolded to ±r), 3D grids the plane through the node nearest `at` across
 * axis `across` (0: x, 1: y, 2: z).
 */
export function fieldMap(sol: FieldSolution, volts: readonly number[], across = 2, at = 0, problem?: FieldProblem): FieldMap {
  const g = sol.grid;
  const [n0, n1] = g.shape;
  const node = (i: number, j: number, k: number) => i + n0 * (j + n1 * k);
  let ua: number, va: number;
  if (g.symmetry === 'axial') { ua = 1; va = 0; across = 2; }
  else if (g.symmetry === 'planar') { ua = 0; va = 1; across = 2; }
  else { [ua, va] = across === 0 ? [2, 1] : across === 1 ? [2, 0] : [0, 1]; }
  const U = unfoldAxis(g, ua), V = unfoldAxis(g, va);
  let fixed = 0;
  let plane = '';
  if (g.symmetry === 'none') {
    const W = unfoldAxis(g, across);
    let best = 0;
    for (let i = 1; i < W.coords.length; i++) if (Math.abs(W.coords[i] - at) < Math.abs(W.coords[best] - at)) best = i;
    fixed = W.index[best];
    plane = `${'xyz'[across]} = ${Number((W.coords[best] * 1e3).toPrecision(4))} mm`;
  } else {
    plane = g.symmetry === 'axial' ? 'r–z plane through the axis' : 'cross-section';
  }
  const nu = U.coords.length, nv = V.coords.length;
  const values = new Float64Array(nu * nv);
  const inside = new Int16Array(nu * nv);
  const idx = [0, 0, 0];
  for (let b = 0; b < nv; b++) for (let a = 0; a < nu; a++) {
    idx[ua] = U.index[a]; idx[va] = V.index[b]; idx[across] = fixed;
    const p = node(idx[0], idx[1], idx[2]);
    let s = 0;
    for (let k = 0; k < sol.units.length; k++) s += volts[k] * sol.units[k][p];
    values[a + nu * b] = s;
    inside[a + nu * b] = sol.inside[p];
  }
  const names = ['x', 'y', 'z'];
  const name = (ai: number) => (g.symmetry === 'axial' ? (ai === 0 ? 'r' : 'z') : names[ai]);
  const planeAt = g.symmetry === 'none' ? g.origin[across] + fixed * g.spacing : 0;
  const electrodeAt = problem === undefined ? undefined : shapeTest(problem, g, ua, va, across, planeAt);
  return { u: { name: name(ua), coords: U.coords }, v: { name: name(va), coords: V.coords }, values, inside, plane, electrodeAt };
}

/**
 * Which electrode holds the plane point (u, v): the first whose shapes contain it, as labelLevel
 * (assemble.ts) labels nodes, after folding each mirrored coordinate onto the solved side
 * (x, y → |x|, |y|; z → L/2 + |z − L/2|; axial r → |r|).
 */
function shapeTest(problem: FieldProblem, g: SolvedGrid, ua: number, va: number, across: number, planeAt: number): (u: number, v: number) => number {
  const sets = electrodeSets(problem);
  const mirrored = [g.symmetry === 'axial' || g.mirror.includes('x'), g.symmetry !== 'axial' && g.mirror.includes('y'), g.mirror.includes('z')];
  // The z mirror plane is where the stored z axis starts (axial grids: axis 1; 3D: axis 2).
  const zAxis = g.symmetry === 'axial' ? 1 : 2;
  const zMid = g.origin[zAxis];
  const p = [0, 0, 0];
  const fold = (ai: number, c: number): number => {
    if (ai === zAxis && g.symmetry !== 'planar') return mirrored[2] ? zMid + Math.abs(c - zMid) : c;
    return mirrored[ai] ? Math.abs(c) : c;
  };
  return (u, v) => {
    p[0] = 0; p[1] = 0; p[2] = 0;
    p[ua] = fold(ua, u); p[va] = fold(va, v);
    if (g.symmetry === 'none') p[across] = planeAt;
    for (let k = 0; k < sets.length; k++) if (sets[k].inside(p[0], p[1], p[2])) return k;
    return -1;
  };
}
