// The scan-line window printed on the stability diagram, against the published corners of the
// filter's first region (Dawson, Quadrupole Mass Spectrometry and its Applications, 1976, ch. 2:
// apex at q ≈ 0.706, a ≈ 0.237; the region meets a = 0 at q ≈ 0.908).

import { describe, expect, it } from 'vitest';
import { firstRegionQuadrupole } from '../../sim/mathieu/boundaries.js';
import { scanWindow } from '../../render/plot/kinds/stability.js';

describe('scan line window', () => {
  const region = firstRegionQuadrupole(160);
  it('a nearly flat scan line passes from q → 0 to the q ≈ 0.908 edge', () => {
    const w = scanWindow(region, 1e-4)!;
    // Tolerances: Dawson's values are quoted to 3 decimals.
    expect(w[1]).toBeCloseTo(0.908, 3);
    expect(w[0]).toBeLessThan(0.02);
  });
  it('the window closes on the apex as a/q approaches 0.237/0.706', () => {
    const apexSlope = 0.23699 / 0.70600;
    const w = scanWindow(region, apexSlope * 0.999)!;
    expect(w[0]).toBeLessThan(0.706);
    expect(w[1]).toBeGreaterThan(0.706);
    expect(w[1] - w[0]).toBeLessThan(0.02);
    expect(scanWindow(region, apexSlope * 1.01)).toBeNull();
  });
});
