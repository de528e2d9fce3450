// Edges of the Mathieu stability regions, found from the monodromy matrix (floquet.ts) by root
// finding on tr M = ±2, and the first stability regions of the quadrupole filter and the RF trap.
//
// For fixed q ≥ 0 the rotation number F(a) (β where stable) is continuous and non-decreasing in a;
// the characteristic values are its level-set edges (McLachlan 1947, §4.20; Abramowitz & Stegun,
// Handbook of Mathematical Functions, 1964, §20.2):
//   a0 = sup{F = 0},  b_k = inf{F ≥ k},  a_k = sup{F ≤ k}   (k ≥ 1),
// with tr M = +2 at a0, b2, a2 and tr M = −2 at b1, a1. Bisection on F isolates an edge until one
// end of the bracket lies in the instability gap and the other in a band (or gap) beside it, then Brent's method polishes the root of
// s·trM/2 − 1 (s = (−1)^k). Characteristic values are even in q for a_k with k even and swap
// a_k ↔ b_k for k odd under q → −q (A&S 20.2.15); the functions below take |q| and name the curves
// for q ≥ 0, which is how the filter and trap regions are drawn.

import { floquet, halfTrace, type MonodromyOptions } from './floquet.js';
import { brentRoot } from './root-find.js';

/** Point of a stability diagram: Mathieu q (abscissa) and a (ordinate). */
export interface QA {
  q: number;
  a: number;
}

export type EdgeSide = 'lower' | 'upper';

const A_TOL = 1e-13;

/**
 * Edge of the rotation-number level k at fixed q: side 'lower' gives inf{a: F(a) ≥ k} (= b_k),
 * side 'upper' gives sup{a: F(a) ≤ k} (= a_k; a0 for k = 0).
 */
export function characteristicEdge(q: number, k: number, side: EdgeSide, options: MonodromyOptions = {}): number {
  if (!Number.isInteger(k) || k < 0 || (k === 0 && side === 'lower')) {
    throw new RangeError(`characteristicEdge: need an integer k ≥ 0 (k ≥ 1 for the lower edge), got ${k} ${side}`);
  }
  const aq = Math.abs(q);
  if (aq === 0) return k * k;
  const F = (a: number) => floquet(a, aq, options).rotation;
  const past = side === 'lower' ? (f: number) => f >= k : (f: number) => f > k;
  // Sturm comparison with the constant coefficients a ∓ 2|q| bounds the edge: for a < −2|q| the
  // coefficient is negative (F = 0); for a − 2|q| ≥ (k+1)² the rotation exceeds k.
  let lo = -2 * aq - 1, hi = (k + 1) * (k + 1) + 2 * aq;
  let Flo = 0, Fhi = F(hi);
  const s = k % 2 === 0 ? 1 : -1;
  const G = (a: number) => s * halfTrace(a, aq, options) - 1; // ≥ 0 in gap k, < 0 in the bands beside it
  for (let iter = 0; iter < 400; iter++) {
    if (side === 'lower' && Flo >= k - 1 && Flo < k && Fhi === k) return brentRoot(G, lo, hi, A_TOL);
    if (side === 'upper' && Flo === k && Fhi > k && Fhi <= k + 1) return brentRoot(G, lo, hi, A_TOL);
    if (hi - lo <= A_TOL * Math.max(1, Math.abs(lo))) break;
    const mid = 0.5 * (lo + hi);
    const Fm = F(mid);
    if (past(Fm)) { hi = mid; Fhi = Fm; } else { lo = mid; Flo = Fm; }
  }
  return 0.5 * (lo + hi); // gap narrower than the tolerance (q very small)
}

/** a0(q): lower edge of the first stability band (β = 0, tr M = 2). */
export function a0(q: number, options?: MonodromyOptions): number { return characteristicEdge(q, 0, 'upper', options); }
/** b1(q): upper edge of the first stability band (β = 1, tr M = −2). */
export function b1(q: number, options?: MonodromyOptions): number { return characteristicEdge(q, 1, 'lower', options); }
/** a1(q): lower edge of the second stability band (β = 1). */
export function a1(q: number, options?: MonodromyOptions): number { return characteristicEdge(q, 1, 'upper', options); }
/** b2(q): upper edge of the second stability band (β = 2). */
export function b2(q: number, options?: MonodromyOptions): number { return characteristicEdge(q, 2, 'lower', options); }

// ---------------------------------------------------------------------------------------------
// Quadrupole mass filter: x has (a, q), y has (−a, −q) (DESIGN.md). Both stable in the first band:
//   a0(q) < a < b1(q)  and  a0(q) < −a < b1(q)   ⇒   max(a0, −b1) < a < min(−a0, b1).

/** Upper edge of the filter's first region at q: min(−a0(q), b1(q)) (y limits left of the apex, x right). */
export function quadrupoleUpperEdge(q: number): number {
  return Math.min(-a0(q), b1(q));
}

/** Apex of the filter's first region: −a0(q) = b1(q) (about q 0.706, a 0.237; Dawson 1976). */
export function quadrupoleApex(): QA {
  const q = brentRoot((x) => b1(x) + a0(x), 0.3, 0.9, 1e-12);
  return { q, a: b1(q) };
}

/** q where the first region meets a = 0 on the right: b1(q) = 0, i.e. tr M(0, q) = −2 (≈ 0.908). */
export function firstRegionEdgeQ(): number {
  return brentRoot((x) => halfTrace(0, x) + 1, 0.5, 1.0, 1e-13);
}

export interface RegionOptions {
  /** Quadrupole only: include the mirror image a < 0 (full region); default false (a ≥ 0). */
  full?: boolean;
}

/**
 * First stability region of the quadrupole filter as a polygon of (q, a) points, counter-clockwise
 * from (0, 0): along the y edge −a0(q) to the apex, down the x edge b1(q) to (q ≈ 0.908, 0), and
 * (with `full`) on along the mirror image back to the origin. The apex and end points are exact
 * vertices; nPoints (≥ 4) samples are shared between the two edges in proportion to their q span.
 */
export function firstRegionQuadrupole(nPoints = 100, options: RegionOptions = {}): QA[] {
  const n = Math.max(4, Math.floor(nPoints));
  const apex = quadrupoleApex();
  const qEnd = firstRegionEdgeQ();
  const nLeft = Math.max(2, Math.round(n * apex.q / qEnd));
  const nRight = Math.max(2, n - nLeft);
  const top: QA[] = [{ q: 0, a: 0 }];
  for (let i = 1; i < nLeft; i++) { const q = (apex.q * i) / nLeft; top.push({ q, a: -a0(q) }); }
  top.push(apex);
  for (let i = 1; i < nRight; i++) { const q = apex.q + ((qEnd - apex.q) * i) / nRight; top.push({ q, a: b1(q) }); }
  top.push({ q: qEnd, a: 0 });
  if (!options.full) return top;
  const bottom = top.slice(1, -1).reverse().map((p) => ({ q: p.q, a: -p.a }));
  return [...top, ...bottom];
}

// ---------------------------------------------------------------------------------------------
// RF trap: z has (a_z, q_z), r has (a_r, q_r) = (−a_z/2, −q_z/2) (DESIGN.md). Both stable:
//   a0(q_z) < a_z < b1(q_z)   and   −2 b1(q_z/2) < a_z < −2 a0(q_z/2).

/** Upper edge at q_z: min(β_z = 1 edge b1(q_z), β_r = 0 edge −2 a0(q_z/2)). */
export function trapUpperEdge(qz: number): number {
  return Math.min(b1(qz), -2 * a0(qz / 2));
}

/** Lower edge at q_z: max(β_z = 0 edge a0(q_z), β_r = 1 edge −2 b1(q_z/2)). */
export function trapLowerEdge(qz: number): number {
  return Math.max(a0(qz), -2 * b1(qz / 2));
}

export interface TrapRegionVertices {
  /** β_r = 0 meets β_z = 1 (top corner). */
  top: QA;
  /** β_z = 0 meets β_r = 1 (bottom corner). */
  bottom: QA;
  /** Right-most point, where the upper and lower edges meet. */
  right: QA;
}

/** Corners of the trap's first region in (q_z, a_z). */
export function trapRegionVertices(): TrapRegionVertices {
  const qt = brentRoot((x) => b1(x) + 2 * a0(x / 2), 0.3, 0.908, 1e-12);
  const qb = brentRoot((x) => a0(x) + 2 * b1(x / 2), 0.5, 2.0, 1e-12);
  const qr = brentRoot((x) => trapUpperEdge(x) - trapLowerEdge(x), Math.max(qt, qb) - 1e-9 > 0 ? Math.min(qt, qb) : 0.5, 2.5, 1e-12);
  return {
    top: { q: qt, a: b1(qt) },
    bottom: { q: qb, a: a0(qb) },
    right: { q: qr, a: b1(qr) },
  };
}

/**
 * First stability region of the RF trap as a polygon of (q_z, a_z) points: the upper edge from
 * (0, 0) to the right-most corner, then the lower edge back towards the origin. Corners are exact
 * vertices; nPoints (≥ 6) samples in all.
 */
export function firstRegionTrap(nPoints = 100): QA[] {
  const n = Math.max(6, Math.floor(nPoints));
  const v = trapRegionVertices();
  const half = Math.max(3, Math.floor(n / 2));
  const edge = (qCorner: number, qEnd: number, fn: (q: number) => number, corner: QA, count: number): QA[] => {
    const pts: QA[] = [];
    const nA = Math.max(1, Math.round(count * qCorner / qEnd));
    const nB = Math.max(1, count - nA);
    for (let i = 1; i < nA; i++) { const q = (qCorner * i) / nA; pts.push({ q, a: fn(q) }); }
    pts.push(corner);
    for (let i = 1; i < nB; i++) { const q = qCorner + ((qEnd - qCorner) * i) / nB; pts.push({ q, a: fn(q) }); }
    return pts;
  };
  const upper = edge(v.top.q, v.right.q, trapUpperEdge, v.top, half);
  const lower = edge(v.bottom.q, v.right.q, trapLowerEdge, v.bottom, n - half);
  return [{ q: 0, a: 0 }, ...upper, v.right, ...lower.reverse()];
}
