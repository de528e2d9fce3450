// RF multipoles (sim/mathieu/multipole.ts) against D. Gerlich, Adv. Chem. Phys. 82, 1 (1992):
// V*(r) = n²q²V²/(4mΩ²r0²)·(r/r0)^(2n−2) and η = 2n(n−1)qV/(mΩ²r0²)·(r/r0)^(n−2), recomputed
// here from CODATA 2018 constants; and, for the quadrupole (n = 2), against two independent
// results of the Mathieu module: η equals the Mathieu q (DESIGN.md q = 4zeV/(m r0² Ω²)) and V*(r0)
// equals the Dehmelt well depth of an RF-only filter, D = qV/4 (Dehmelt 1967, sim/mathieu).
import { describe, it, expect } from 'vitest';
import { multipoleFigures } from '../../sim/mathieu/multipole.js';
import { analyzeOperatingPoint } from '../../sim/mathieu/operating-point.js';
import { ATOMIC_MASS_UNIT, ELEMENTARY_CHARGE } from '../../sim/units/constants.js';
import { iontrail } from '../helpers/cli.js';

describe('RF multipole effective potential and adiabaticity', () => {
  it('octupole: V* and η from Gerlich’s formulas at r0/2 and r0, η = 0.3 radius', () => {
    const r0 = 2e-3, f = 5e6, V = 200, mz = 100, n = 4;
    const r = multipoleFigures({ poles: 8, r0, freq: f, rf: V, mz, radius: r0 / 2 });
    const q = ELEMENTARY_CHARGE, m = mz * ATOMIC_MASS_UNIT, w = 2 * Math.PI * f;
    const vStarR0 = (n * n * q * q * V * V) / (4 * m * w * w * r0 * r0);
    expect(r.depth_at_r0_ev).toBeCloseTo(vStarR0 / q, 10);
    expect(r.effective_potential_ev).toBeCloseTo((vStarR0 / q) * 0.5 ** 6, 10);
    const eta0 = (2 * n * (n - 1) * q * V) / (m * w * w * r0 * r0);
    expect(r.eta_at_r0).toBeCloseTo(eta0, 12);
    expect(r.eta_at_radius).toBeCloseTo(eta0 / 4, 12);
    expect(r.eta_limit_radius_m!).toBeCloseTo(r0 * Math.sqrt(0.3 / eta0), 15);
  });
  it('quadrupole: η is the Mathieu q and V*(r0) the Dehmelt depth qV/4 of an RF-only filter', () => {
    const op = { analyzer: 'quadrupole' as const, r0: 4e-3, freq: 1.2e6, rf: 832, dc: 0, mz: 502 };
    const r = multipoleFigures({ poles: 4, r0: op.r0, freq: op.freq, rf: op.rf, mz: op.mz });
    const m = analyzeOperatingPoint(op);
    const x = m.axes.find((a) => a.axis === 'x')!;
    expect(r.eta_at_r0).toBeCloseTo(x.q, 12);
    expect(r.eta_limit_radius_m).toBeNull();
    expect(r.effective_potential_v).toBeCloseTo((x.q * op.rf) / 4, 9);
    expect(x.wellDepthV!).toBeCloseTo(r.effective_potential_v, 6);
  });
  it('iontrail check --analyzer multipole: the figures as JSON, and one-line errors', () => {
    const ok = iontrail(['check', '--analyzer', 'multipole', '--poles', '8', '--r0', '2mm', '--freq', '5MHz', '--rf', '200V', '--mz', '100', '--radius', '1mm', '--json']);
    expect(ok.code).toBe(0);
    const j = JSON.parse(ok.stdout);
    expect(j.analyzer).toBe('multipole');
    expect(j.n).toBe(4);
    expect(j.eta_limit_radius_m).toBeGreaterThan(1e-3);
    const bad = iontrail(['check', '--analyzer', 'multipole', '--poles', '7', '--r0', '2mm', '--freq', '5MHz', '--rf', '200V', '--mz', '100']);
    expect(bad.code).toBe(2);
    expect(bad.stderr.trim().split('\n')).toHaveLength(1);
    expect(bad.stderr).toMatch(/--poles expects an even number of rods/);
    const far = iontrail(['check', '--analyzer', 'multipole', '--poles', '6', '--r0', '2mm', '--freq', '5MHz', '--rf', '200V', '--mz', '100', '--radius', '3mm']);
    expect(far.code).toBe(2);
    expect(far.stderr).toMatch(/beyond the rods' inscribed radius/);
  });
});
