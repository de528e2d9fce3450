// Operating-point figures (sim/mathieu/operating-point.ts, parameters.ts, well-depth.ts).
import { describe, it, expect } from 'vitest';
import { analyzeOperatingPoint, mzWindow } from '../../sim/mathieu/operating-point.js';
import { mathieuParameters, mzAtQ, type OperatingPoint } from '../../sim/mathieu/parameters.js';
import { floquet, halfTrace } from '../../sim/mathieu/floquet.js';
import { quadrupoleApex } from '../../sim/mathieu/boundaries.js';

// CODATA 2018, written out here so the check does not reuse the project's constants module.
const E = 1.602176634e-19;
const U = 1.6605390666e-27;

const filter: OperatingPoint = { analyzer: 'quadrupole', r0: 4e-3, freq: 1.2e6, rf: 600, dc: 50, mz: 502 };
const trap: OperatingPoint = { analyzer: 'trap', r0: 7.07e-3, freq: 1.05e6, rf: 400, dc: 0, mz: 609 };

describe('Mathieu a and q (DESIGN.md; Dawson 1976 ch. 2; March & Todd 2005 ch. 2)', () => {
  it('filter: a = 8eU/(m r0² Ω²), q = 4eV/(m r0² Ω²); y has (−a, −q)', () => {
    const [x, y] = mathieuParameters(filter);
    const m = 502 * U, w = 2 * Math.PI * 1.2e6;
    expect(x.q).toBeCloseTo((4 * E * 600) / (m * 16e-6 * w * w), 12);
    expect(x.a).toBeCloseTo((8 * E * 50) / (m * 16e-6 * w * w), 12);
    expect(y.a).toBe(-x.a);
    expect(y.q).toBe(-x.q);
    expect(x.a / x.q).toBeCloseTo((2 * 50) / 600, 14); // scan line a/q = 2U/V
  });

  it('trap: q_z = 8eV/(m (r0² + 2z0²) Ω²), a_z = −16eU/(…), r has half and opposite sign; z0 defaults to r0/√2', () => {
    const p = { ...trap, dc: -5 };
    const [z, r] = mathieuParameters(p);
    const m = 609 * U, w = 2 * Math.PI * 1.05e6, d2 = 2 * 7.07e-3 ** 2;
    expect(z.q).toBeCloseTo((8 * E * 400) / (m * d2 * w * w), 12);
    expect(z.a).toBeCloseTo((-16 * E * -5) / (m * d2 * w * w), 12);
    expect(r.q).toBeCloseTo(-z.q / 2, 14);
    expect(r.a).toBeCloseTo(-z.a / 2, 14);
    const [z2] = mathieuParameters({ ...p, z0: 7.07e-3 / Math.SQRT2 });
    expect(z2.q).toBe(z.q);
  });

  it('a doubly charged ion at m/z 502 has the same a and q as a singly charged one (m = (m/z)·z·u)', () => {
    const [x1] = mathieuParameters(filter);
    const [x2] = mathieuParameters({ ...filter, charge: 2 });
    expect(x2.q).toBeCloseTo(x1.q, 14);
  });
});

describe('operating-point report', () => {
  it('secular frequency ω = βΩ/2 and sidebands Ω ± ω (March & Todd 2005, §2.5)', () => {
    const r = analyzeOperatingPoint(trap);
    for (const ax of r.axes) {
      const f = floquet(ax.a, ax.q);
      expect(ax.beta).toBe(f.beta);
      expect(ax.secularFrequencyHz).toBeCloseTo((f.beta! * trap.freq) / 2, 6);
      expect(ax.sidebandsHz![0]).toBeCloseTo(trap.freq - ax.secularFrequencyHz!, 6);
      expect(ax.sidebandsHz![1]).toBeCloseTo(trap.freq + ax.secularFrequencyHz!, 6);
    }
    expect(r.stable).toBe(true);
    expect(r.firstRegion).toBe(true);
  });

  it('trap well depth D_z = q_z V/8 and D_r = D_z/2 for r0² = 2z0², RF only (Dehmelt 1967; March & Todd 2005, §2.6)', () => {
    const r = analyzeOperatingPoint(trap);
    const [z, rr] = r.axes;
    expect(z.wellDepthV).toBeCloseTo((z.q * trap.rf) / 8, 10);
    expect(rr.wellDepthV).toBeCloseTo(z.wellDepthV! / 2, 10);
    expect(z.wellDepthValid).toBe(true);
  });

  it('filter well depth equals ½ m ω² r0² / e with the exact secular frequency at small q (pseudopotential picture)', () => {
    // RF only, q_x ≈ 0.1: the pseudopotential's harmonic frequency is the Dehmelt one, which the
    // exact β matches to < 1 % here (see floquet.test.ts), so the energies agree to ~2 %.
    const p: OperatingPoint = { ...filter, dc: 0, mz: 3000 };
    const r = analyzeOperatingPoint(p);
    const x = r.axes[0];
    const w = 2 * Math.PI * x.secularFrequencyHz!;
    const exactDepth = (0.5 * 3000 * U * w * w * p.r0 * p.r0) / E;
    expect(Math.abs(x.wellDepthV! / exactDepth - 1)).toBeLessThan(0.02);
    // And the closed form D = qV/4 for rods at ±V to ground (derived in well-depth.ts).
    expect(x.wellDepthV).toBeCloseTo((x.q * p.rf) / 4, 10);
    expect(x.wellDepthValid).toBe(true);
    expect(analyzeOperatingPoint({ ...p, mz: 500 }).axes[0].wellDepthValid).toBe(false); // q ≈ 0.6
  });

  it('no well depth on an unstable axis, whatever the sign of a + q²/2 (an unbounded motion has no well)', () => {
    // Filter y at a = −0.169, q = −0.507 lies outside the first region (A&S Table 20.1; see the
    // CLI test): a + q²/2 < 0. Filter x at a = 0, q = 0.95 > 0.908 (the a = 0 edge, March & Todd
    // 2005 ch. 2) is unstable with a + q²/2 > 0: the pseudopotential formula would give a depth.
    const y = analyzeOperatingPoint({ ...filter, dc: 100 }).axes[1];
    expect(y.stable).toBe(false);
    expect(y.wellDepthV).toBeNull();
    expect(y.wellDepthEv).toBeNull();
    const qHigh = mzAtQ(filter, filter.rf, 0.95);
    const x = analyzeOperatingPoint({ ...filter, dc: 0, mz: qHigh }).axes[0];
    expect(x.q).toBeCloseTo(0.95, 6);
    expect(x.stable).toBe(false);
    expect(x.wellDepthV).toBeNull();
  });

  it('trap low-mass cut-off: the m/z with q_z = 0.908 at this RF (March & Todd 2005); just above it is held, well below it is not', () => {
    const r = analyzeOperatingPoint(trap);
    const [z] = mathieuParameters({ ...trap, mz: r.lmcoMz! });
    expect(z.q).toBeCloseTo(0.908, 12);
    expect(analyzeOperatingPoint({ ...trap, mz: r.lmcoMz! * 1.001 }).stable).toBe(true);
    expect(analyzeOperatingPoint({ ...trap, mz: r.lmcoMz! * 0.99 }).stable).toBe(false);
    // Settable: a lower ejection q means a higher cut-off m/z, in inverse proportion.
    const r2 = analyzeOperatingPoint(trap, { qEject: 0.454 });
    expect(r2.lmcoMz! / r.lmcoMz!).toBeCloseTo(2, 12);
  });

  it('fact of the trade (common practice, no source): r0 4 mm, 1.2 MHz, 5 kV 0-p reaches about m/z 3000 at the apex', () => {
    const r = analyzeOperatingPoint({ ...filter, rf: 1000 }, { rfMax: 5000 });
    // "About 3000": a ±7 % band; typical instruments top out near m/z 3000–4000.
    expect(r.mzMax!).toBeGreaterThan(2800);
    expect(r.mzMax!).toBeLessThan(3200);
  });
});

describe('m/z window along the scan line a/q = 2U/V (Dawson 1976, ch. 2)', () => {
  it('the window edges lie on the region edges: y unstable below the high edge of m/z, x at the low edge', () => {
    const w = mzWindow(filter)!;
    expect(w).not.toBeNull();
    expect(w.high).not.toBeNull();
    // At the low m/z edge the x motion reaches β = 1 (tr = −2); at the high edge the y motion β = 0 (tr = +2).
    const [xl] = mathieuParameters({ ...filter, mz: w.low });
    expect(Math.abs(halfTrace(xl.a, xl.q) + 1)).toBeLessThan(1e-9);
    const [, yh] = mathieuParameters({ ...filter, mz: w.high! });
    expect(Math.abs(halfTrace(yh.a, yh.q) - 1)).toBeLessThan(1e-9);
    const mid = 0.5 * (w.low + w.high!);
    expect(analyzeOperatingPoint({ ...filter, mz: mid }).stable).toBe(true);
    expect(analyzeOperatingPoint({ ...filter, mz: w.low * 0.999 }).stable).toBe(false);
    expect(analyzeOperatingPoint({ ...filter, mz: w.high! * 1.001 }).stable).toBe(false);
  });

  it('narrows as U/V approaches the apex slope and closes above it; RF only passes everything above q = 0.908', () => {
    const apex = quadrupoleApex();
    const slope = apex.a / apex.q; // a/q = 2U/V at the apex
    const at = (frac: number) => mzWindow({ ...filter, dc: (frac * slope * filter.rf) / 2 });
    const w90 = at(0.9)!, w99 = at(0.99)!;
    expect(w99.resolution!).toBeGreaterThan(w90.resolution!);
    expect(at(1.01)).toBeNull();
    const rfOnly = mzWindow({ ...filter, dc: 0 })!;
    expect(rfOnly.high).toBeNull();
    expect(rfOnly.low / mzAtQ(filter, filter.rf, 0.908)).toBeCloseTo(1, 3);
  });

  it('margin to the window edges is reported inside the window only', () => {
    const w = mzWindow(filter)!;
    const mid = 0.5 * (w.low + w.high!);
    const r = analyzeOperatingPoint({ ...filter, mz: mid });
    expect(r.mzMargin!.below).toBeCloseTo(mid - w.low, 10);
    expect(r.mzMargin!.above!).toBeCloseTo(w.high! - mid, 10);
    expect(analyzeOperatingPoint({ ...filter, mz: w.low * 0.9 }).mzMargin).toBeNull();
  });

  it('negative DC gives the same window (x and y swap roles)', () => {
    const w1 = mzWindow(filter)!, w2 = mzWindow({ ...filter, dc: -filter.dc })!;
    expect(w2.low).toBeCloseTo(w1.low, 8);
    expect(w2.high!).toBeCloseTo(w1.high!, 8);
  });
});
