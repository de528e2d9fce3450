// Refusals before a solve: a grid that does not make sense or does not fit in memory, shapes outside
// the grid or narrower than three cells, electrodes at different potentials that overlap. Each is a
// FieldInputError with the key path inside the stage (YAML names) and a one-line message.

import { availableParallelism, freemem } from 'node:os';
import { FieldInputError, type Electrode, type FieldProblem } from './problem.js';
import { axesOf, levelsOf, nodesAlong } from './grid.js';
import { electrodeSets } from './operator.js';
import { solidOf } from './solids.js';
import { STORE_T_MAX } from './unit.js';

function mm(v: number): string {
  return `${Number((v * 1e3).toPrecision(3))} mm`;
}

function bytesText(b: number): string {
  return b >= 2 ** 30 ? `${(b / 2 ** 30).toFixed(1)} GiB` : `${(b / 2 ** 20).toFixed(0)} MiB`;
}

/**
 * Bytes the solve will hold at its peak: per level the diagonal (and the fine labels), per
 * concurrent unit solve five or six Krylov vectors (unit.ts) and two work vectors per coarse level, and the unit
 * solutions returned (one grid of doubles per electrode).
 */
export function estimateMemory(problem: FieldProblem): number {
  const levels = levelsOf(problem.grid);
  const padded = levels.map((l) => l.nodes + 2 * l.guard);
  const fine = padded[0], coarse = padded.slice(1).reduce((s, n) => s + n, 0);
  const E = problem.electrodes.length, concurrent = Math.max(1, Math.min(availableParallelism(), E));
  return 8 * (fine + coarse) + 2 * fine + 2 * (coarse > 0 ? padded[1] : 0)
    + concurrent * 8 * ((fine <= STORE_T_MAX ? 6 : 5) * fine + 2 * coarse) + E * 8 * fine + 2 * levels[0].nodes;
}

function sameVolts(a: Electrode, b: Electrode): boolean {
  return a.potential.dc === b.potential.dc && a.potential.rf === b.potential.rf && a.potential.aux === b.potential.aux;
}

export function checkProblem(problem: FieldProblem, opts: { freeMemoryBytes?: number } = {}): void {
  const g = problem.grid, h = g.spacing;
  if (!(h > 0) || !Number.isFinite(h)) throw new FieldInputError('grid.spacing', `grid spacing must be a positive length, got ${h} m`);
  if (g.symmetry !== 'axial' && !((g.halfWidth ?? 0) > 0)) throw new FieldInputError('grid.half_width', 'grid.half_width must be a positive length (m)');
  if (g.symmetry === 'axial' && !((g.radius ?? 0) > 0)) throw new FieldInputError('grid.radius', 'grid.radius must be a positive length (m)');
  if (!(g.length > 0)) throw new FieldInputError('grid.length', 'the stage length must be positive (m)');
  const axes = axesOf(g);
  axes.forEach((ax) => {
    if (nodesAlong(ax, h) < 5) throw new FieldInputError('grid.spacing', `grid spacing ${mm(h)} leaves fewer than 5 nodes across ${mm(ax.hi - ax.lo)}; use a spacing of at most ${mm((ax.hi - ax.lo) / 8)}`);
  });
  const est = estimateMemory(problem), free = opts.freeMemoryBytes ?? freemem();
  if (est > free) {
    const nodes = levelsOf(g)[0].nodes;
    throw new FieldInputError('grid.spacing', `a grid of ${nodes.toExponential(2)} nodes at spacing ${mm(h)} needs about ${bytesText(est)}, more than the ${bytesText(free)} of free memory; use a coarser spacing or mirror planes`);
  }
  // The whole box, before mirroring: planar x, y ∈ ±half_width; axial r ∈ [0, radius], z ∈ [0, L].
  const hw = g.halfWidth ?? 0;
  const lo = g.symmetry === 'axial' ? [0, 0, -Infinity] : [-hw, -hw, g.symmetry === 'none' ? 0 : -Infinity];
  const hi = g.symmetry === 'axial' ? [g.radius ?? 0, g.length, Infinity] : [hw, hw, g.symmetry === 'none' ? g.length : Infinity];
  problem.electrodes.forEach((e, i) => {
    for (const [list, what] of [[e.shapes, 'shapes'], [e.holes, 'holes']] as const) {
      list.forEach((sh, j) => {
        const key = `electrodes.${i}.${what}.${j}`, s = solidOf(sh, g.symmetry);
        const outside = [0, 1, 2].some((a) => s.box[a] > hi[a] || s.box[a + 3] < lo[a]);
        if (outside && what === 'shapes') throw new FieldInputError(key, `${sh.kind} of electrode '${e.name}' lies outside the grid`);
        if (!outside && s.width < 3 * h) {
          throw new FieldInputError(key, `${s.feature} of electrode '${e.name}' is ${mm(s.width)}, narrower than three cells of ${mm(h)}; use a spacing of at most ${mm(s.width / 4)}`);
        }
      });
    }
  });
  overlaps(problem);
}

/** Electrodes at different potentials that share a grid node (the solver's nodes, mirrored half). */
function overlaps(problem: FieldProblem): void {
  const g = problem.grid, h = g.spacing, axes = axesOf(g), els = electrodeSets(problem), E = els.length;
  for (let i = 0; i < E; i++) for (let j = i + 1; j < E; j++) {
    const a = problem.electrodes[i], b = problem.electrodes[j];
    if (sameVolts(a, b)) continue;
    const range = axes.map((ax, d) => {
      const l = Math.max(els[i].box[d], els[j].box[d], ax.lo), u = Math.min(els[i].box[d + 3], els[j].box[d + 3], ax.hi);
      return [Math.max(0, Math.ceil((l - ax.lo) / h - 1e-9)), Math.floor((u - ax.lo) / h + 1e-9)];
    });
    if (range.some(([l, u]) => u < l)) continue;
    const [r0, r1, r2] = [range[0], range[1], range[2] ?? [0, 0]];
    for (let k = r2[0]; k <= r2[1]; k++) for (let jj = r1[0]; jj <= r1[1]; jj++) for (let ii = r0[0]; ii <= r0[1]; ii++) {
      const p = [axes[0].lo + ii * h, axes[1].lo + jj * h, axes.length === 3 ? axes[2].lo + k * h : 0] as const;
      if (!els[i].inside(p[0], p[1], p[2]) || !els[j].inside(p[0], p[1], p[2])) continue;
      const s = els[j].shapes.findIndex((sh) => sh.inside(p[0], p[1], p[2]));
      const where = p.slice(0, axes.length).map(mm).join(', ');
      throw new FieldInputError(`electrodes.${j}.shapes.${Math.max(0, s)}`, `electrode '${b.name}' overlaps electrode '${a.name}' at (${where}) but their potentials differ`);
    }
  }
}
