// The operating line a/q = const through the origin of the stability diagram. Changing m/z at fixed
// U and V moves the point along this line (both a and q scale with 1/m), so the m/z values inside the
// first stability region form one interval: the transmitted window of a filter (Dawson 1976, ch. 2;
// the scan line a/q = 2U/V) and the stored range of a trap (March & Todd 2005, ch. 2).

import { floquet, halfTrace } from './floquet.js';
import { brentRoot } from './root-find.js';
import type { Analyzer } from './parameters.js';

/** Interval of reference-axis q (x or z) inside the first region; qLow = 0 means unbounded in m/z. */
export interface QInterval {
  qLow: number;
  qHigh: number;
}

/** Axis parameters as multiples of the reference axis: (a_u, q_u) = (ka·a, kq·q). */
const AXES: Record<Analyzer, readonly { ka: number; kq: number }[]> = {
  quadrupole: [{ ka: 1, kq: 1 }, { ka: -1, kq: -1 }],
  trap: [{ ka: 1, kq: 1 }, { ka: -0.5, kq: -0.5 }],
};

/** β in (0, 1) on every axis, i.e. inside the first stability region. */
export function inFirstRegion(analyzer: Analyzer, a: number, q: number): boolean {
  for (const { ka, kq } of AXES[analyzer]) {
    const f = floquet(ka * a, kq * q);
    if (!f.stable || f.rotation >= 1) return false;
  }
  return true;
}

// Past the right-most corner of either region (filter 0.908, trap ≈ 1.35) nothing is stable.
const Q_SCAN_MAX = 1.6;
const SCAN_POINTS = 240;

/**
 * Part of the line a = slope·q (reference axis) inside the first region, or null when the line
 * misses it. slope = a/q of the reference axis: 2U/V for the filter, −2U/V for the trap.
 */
export function firstRegionOnLine(analyzer: Analyzer, slope: number): QInterval | null {
  const inside = (q: number) => inFirstRegion(analyzer, slope * q, q);
  // Quadratic spacing resolves the entry point near the origin when |slope| is small (the edges
  // leave the origin tangent to a = 0, so the entry q is of order |slope|).
  let prevQ = 0;
  let prevIn = slope === 0; // on a = 0 the region starts at q = 0+
  let qLow: number | null = slope === 0 ? 0 : null;
  let qHigh: number | null = null;
  for (let i = 1; i <= SCAN_POINTS; i++) {
    const q = Q_SCAN_MAX * (i / SCAN_POINTS) ** 2;
    const now = inside(q);
    if (now && !prevIn && qLow === null) qLow = crossing(analyzer, slope, prevQ, q, true);
    if (!now && prevIn) { qHigh = crossing(analyzer, slope, prevQ, q, false); break; }
    prevQ = q; prevIn = now;
  }
  if (qLow === null || qHigh === null) return null;
  return { qLow, qHigh };
}

/** Where the line enters (entering = true) or leaves the first region between q0 and q1. */
function crossing(analyzer: Analyzer, slope: number, q0: number, q1: number, entering: boolean): number {
  // Each axis that changes state in [q0, q1] has its own |tr M| = 2 point; the line is inside once
  // the last of them has become stable (entering) and outside once the first has become unstable.
  const roots: number[] = [];
  for (const { ka, kq } of AXES[analyzer]) {
    const at = (q: number) => floquet(ka * slope * q, kq * q);
    const f0 = at(q0), f1 = at(q1);
    const ok0 = f0.stable && f0.rotation < 1, ok1 = f1.stable && f1.rotation < 1;
    if (ok0 === ok1) continue;
    const unstableEnd = ok0 ? f1 : f0;
    const s = unstableEnd.trace >= 0 ? 1 : -1;
    const g = (q: number) => s * halfTrace(ka * slope * q, kq * q) - 1;
    if ((g(q0) > 0) !== (g(q1) > 0)) { roots.push(brentRoot(g, q0, q1, 1e-14)); continue; }
    // The unstable end sits past a whole band (not expected at the scan spacing): bisect on state.
    let lo = q0, hi = q1;
    for (let i = 0; i < 60; i++) {
      const mid = 0.5 * (lo + hi), fm = at(mid);
      if ((fm.stable && fm.rotation < 1) === ok0) lo = mid; else hi = mid;
    }
    roots.push(0.5 * (lo + hi));
  }
  if (roots.length === 0) return 0.5 * (q0 + q1);
  return entering ? Math.max(...roots) : Math.min(...roots);
}
