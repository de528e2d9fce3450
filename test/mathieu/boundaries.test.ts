// First stability regions of the filter and the trap (sim/mathieu/boundaries.ts).
import { describe, it, expect } from 'vitest';
import {
  quadrupoleApex, firstRegionEdgeQ, firstRegionQuadrupole, firstRegionTrap, trapRegionVertices, a0, b1,
  trapUpperEdge, trapLowerEdge,
} from '../../sim/mathieu/boundaries.js';
import { inFirstRegion } from '../../sim/mathieu/scan-line.js';

describe('quadrupole filter, first stability region', () => {
  it('apex at q ≈ 0.706, a ≈ 0.237 (Dawson, Quadrupole Mass Spectrometry and its Applications, 1976)', () => {
    const apex = quadrupoleApex();
    // Dawson quotes three decimals; 1e-3 is the tolerance (exact: q 0.70600, a 0.23699).
    expect(Math.abs(apex.q - 0.706)).toBeLessThan(1e-3);
    expect(Math.abs(apex.a - 0.237)).toBeLessThan(1e-3);
  });

  it('meets a = 0 at q ≈ 0.908 (March & Todd, Quadrupole Ion Trap Mass Spectrometry, 2005)', () => {
    expect(Math.abs(firstRegionEdgeQ() - 0.908)).toBeLessThan(1e-3);
  });

  it('polygon: starts at the origin, passes through the apex, ends on a = 0 at q ≈ 0.908, and its edges are the a0/b1 curves', () => {
    const poly = firstRegionQuadrupole(60);
    const apex = quadrupoleApex();
    expect(poly[0]).toEqual({ q: 0, a: 0 });
    expect(poly.some((p) => p.q === apex.q && p.a === apex.a)).toBe(true);
    expect(poly[poly.length - 1].a).toBe(0);
    expect(Math.abs(poly[poly.length - 1].q - 0.908)).toBeLessThan(1e-3);
    for (const p of poly.slice(1, -1)) {
      // Left of the apex the y motion limits (a = −a0), right of it the x motion (a = b1).
      const want = p.q <= apex.q ? -a0(p.q) : b1(p.q);
      expect(Math.abs(p.a - want)).toBeLessThan(1e-12);
    }
    // q strictly increasing along the upper edge.
    for (let i = 1; i < poly.length; i++) expect(poly[i].q).toBeGreaterThan(poly[i - 1].q);
  });

  it('points just inside the polygon are stable on x and y, points just outside are not', () => {
    const poly = firstRegionQuadrupole(20);
    for (const p of poly.slice(1, -1)) {
      if (p.a < 0.02) continue; // too close to the tangent at the origin / the q axis end
      expect(inFirstRegion('quadrupole', p.a * 0.995, p.q), `inside below (${p.q}, ${p.a})`).toBe(true);
      expect(inFirstRegion('quadrupole', p.a * 1.005, p.q), `outside above (${p.q}, ${p.a})`).toBe(false);
    }
  });

  it('full region is symmetric in a (x and y swap roles)', () => {
    const full = firstRegionQuadrupole(30, { full: true });
    const upper = full.filter((p) => p.a > 0);
    const lower = full.filter((p) => p.a < 0);
    expect(lower.length).toBe(upper.length);
    for (const p of upper) expect(lower.some((r) => r.q === p.q && r.a === -p.a)).toBe(true);
  });
});

describe('RF trap, first stability region in (q_z, a_z)', () => {
  it('top corner (β_r = 0 meets β_z = 1) near q_z 0.78, a_z 0.15 (March & Todd 2005, ch. 2; values from memory)', () => {
    const v = trapRegionVertices();
    // Remembered to two decimals, so 1e-2.
    expect(Math.abs(v.top.q - 0.78)).toBeLessThan(1e-2);
    expect(Math.abs(v.top.a - 0.15)).toBeLessThan(1e-2);
  });

  it('crosses a_z = 0 at q_z ≈ 0.908 and the polygon is stable just inside on both axes', () => {
    const poly = firstRegionTrap(40);
    expect(poly[0]).toEqual({ q: 0, a: 0 });
    // The upper edge crosses a_z = 0 between consecutive points around q_z 0.908.
    let crossing = NaN;
    for (let i = 1; i < poly.length; i++) {
      if (poly[i - 1].a > 0 && poly[i].a <= 0 && poly[i].q > poly[i - 1].q) {
        const t = poly[i - 1].a / (poly[i - 1].a - poly[i].a);
        crossing = poly[i - 1].q + t * (poly[i].q - poly[i - 1].q);
        break;
      }
    }
    expect(Math.abs(crossing - 0.908)).toBeLessThan(5e-3); // linear interpolation between samples
    const v = trapRegionVertices();
    // Just left of each corner, midway between the upper and lower edges, is inside; beyond each
    // corner (above the top, below the bottom, right of the right one) is outside.
    for (const p of [v.top, v.bottom, v.right]) {
      const q = p.q - 0.01;
      expect(inFirstRegion('trap', 0.5 * (trapUpperEdge(q) + trapLowerEdge(q)), q), `inside near (${p.q}, ${p.a})`).toBe(true);
    }
    expect(inFirstRegion('trap', v.top.a + 0.01, v.top.q)).toBe(false);
    expect(inFirstRegion('trap', v.bottom.a - 0.01, v.bottom.q)).toBe(false);
    expect(inFirstRegion('trap', v.right.a, v.right.q + 0.01)).toBe(false);
    // Every polygon vertex is on the boundary: a nudge towards the inside midpoint is stable.
    for (const p of poly.slice(1)) {
      if (p.q < 0.05 || p.q > v.right.q - 0.02) continue;
      const mid = 0.5 * (trapUpperEdge(p.q) + trapLowerEdge(p.q));
      expect(inFirstRegion('trap', p.a + 0.01 * (mid - p.a), p.q)).toBe(true);
      expect(inFirstRegion('trap', p.a - 0.01 * (mid - p.a), p.q)).toBe(false);
    }
  });
});
