// The node lattice of a grid and of its coarser multigrid levels, and the finite-volume weights of
// each axis. Every operator here is the symmetric finite-volume Laplacian ∫ ∇·∇φ over each node's
// cell, divided by the spacing^(d−2) so that its weights are pure numbers:
//   Cartesian axis: cell measure m = 1 (½ on a mirror plane, whose outer half is the image), edge 1;
//   radial axis of (r, z): m_i = ∫ r dr / h² over the cell = i (1/8 on the axis, cell [0, h/2]),
//   edge i → i+1 weighted r_{i+½}/h = i + ½ (the r-weighted form, e.g. Hackbusch, Elliptic
//   Differential Equations, §4.8 treats the same symmetric form; on the axis it gives
//   ½(φ₁ − φ₀) + ⅛ h² φ_zz = 0, i.e. ∇²φ ≈ 4(φ₁ − φ₀)/h² + φ_zz).
// The edge along axis a between nodes n and n + s_a weighs e_a · Π_{b≠a} m_b.

import type { GridSpec } from './problem.js';

export interface Axis {
  /** Box extent along the axis, m; the node 0 sits at lo. */
  lo: number;
  hi: number;
  /** Node 0 is a mirror plane or the axis r = 0 (free, no edge below) rather than a grounded face. */
  openLow: boolean;
  radial: boolean;
}

export interface Level {
  /** Nodes along the three axes (1 along the missing third axis of a 2D grid). */
  n: [number, number, number];
  spacing: number;
  /** Strides of axes 1 and 2 (0 for a missing axis), and the zero guard before and after the nodes. */
  sy: number;
  sz: number;
  guard: number;
  nodes: number;
  /**
   * Cartesian (no radial axis): every regular row is the plain stencil with unit weights and
   * diagonal 2d, so stencil.ts runs constant-weight kernels; mirror-plane rows are stored as rows.
   */
  uniform: boolean;
  dims: number;
  /** Per axis: cell measure m, weight of the edge to the node below (em) and above (ep). */
  m: Float64Array[];
  em: Float64Array[];
  ep: Float64Array[];
}

export function axesOf(g: GridSpec): Axis[] {
  const mir = (p: 'x' | 'y' | 'z') => g.mirror.includes(p);
  const hw = g.halfWidth ?? 0, L = g.length;
  const cart = (p: 'x' | 'y'): Axis => ({ lo: mir(p) ? 0 : -hw, hi: hw, openLow: mir(p), radial: false });
  const zAxis: Axis = { lo: mir('z') ? L / 2 : 0, hi: L, openLow: mir('z'), radial: false };
  if (g.symmetry === 'planar') return [cart('x'), cart('y')];
  if (g.symmetry === 'axial') return [{ lo: 0, hi: g.radius ?? 0, openLow: true, radial: true }, zAxis];
  return [cart('x'), cart('y'), zAxis];
}

/** Nodes along an axis at spacing h: the last node on the upper face or just beyond it. */
export function nodesAlong(ax: Axis, h: number): number {
  return Math.ceil((ax.hi - ax.lo) / h - 1e-9) + 1;
}

function axisWeights(ax: Axis | undefined, n: number): { m: Float64Array; em: Float64Array; ep: Float64Array } {
  const m = new Float64Array(n).fill(1), em = new Float64Array(n), ep = new Float64Array(n);
  if (ax === undefined) return { m, em, ep };
  for (let i = 0; i < n; i++) {
    if (ax.radial) { m[i] = i === 0 ? 1 / 8 : i; ep[i] = i + 0.5; } else ep[i] = 1;
    em[i] = i > 0 ? ep[i - 1] : 0;
  }
  if (!ax.radial && ax.openLow) m[0] = 0.5;
  ep[n - 1] = 0;
  return { m, em, ep };
}

export function makeLevel(axes: Axis[], n: [number, number, number], spacing: number): Level {
  const w = [0, 1, 2].map((a) => axisWeights(axes[a], n[a]));
  const sy = n[0], sz = axes.length === 3 ? n[0] * n[1] : 0;
  return {
    n, spacing, sy, sz, guard: axes.length === 3 ? sz : sy, nodes: n[0] * n[1] * n[2],
    uniform: !axes.some((ax) => ax.radial), dims: axes.length,
    m: w.map((x) => x.m), em: w.map((x) => x.em), ep: w.map((x) => x.ep),
  };
}

/** Coarse node I sits on fine node 2I; an odd fine count gets one coarse node beyond the box. */
export function coarser(n: number): number {
  return Math.ceil((n - 1) / 2) + 1;
}

/**
 * The levels, finest first: full coarsening of every axis while each has more than 5 nodes, so the
 * coarsest has 3 to 5 nodes along its shortest axis and is solved directly (multigrid.ts).
 */
export function levelsOf(g: GridSpec): Level[] {
  const axes = axesOf(g);
  const n: [number, number, number] = [1, 1, 1];
  axes.forEach((ax, a) => { n[a] = nodesAlong(ax, g.spacing); });
  const out = [makeLevel(axes, [...n], g.spacing)];
  for (;;) {
    const last = out[out.length - 1];
    if (axes.some((_, a) => last.n[a] <= 5)) break;
    const nc: [number, number, number] = [1, 1, 1];
    axes.forEach((_, a) => { nc[a] = coarser(last.n[a]); });
    out.push(makeLevel(axes, nc, last.spacing * 2));
  }
  return out;
}
