// iontrail check --analyzer linear-trap against the closed forms, written out here from CODATA 2018
// constants (the equations: sim/mathieu/linear-trap.ts head, filter convention of DESIGN.md):
// q_x = 4eV/(m r0² Ω²); a_x = 8eU/(m r0² Ω²) − 4eκU_end/(m z0² Ω²); ω_z² = 2eκU_end/(m z0²);
// β from the project's Floquet code, checked against the small-q form β² ≈ a + q²/2 (March & Todd
// 2005, ch. 2), whose neglected terms are of relative order q²/8 (from memory): 0.4 % at q = 0.18,
// so 1 % is the bound.
import { describe, expect, it } from 'vitest';
import { iontrail } from '../helpers/cli.js';

const e = 1.602176634e-19, u = 1.66053906660e-27;

describe('iontrail check --analyzer linear-trap', () => {
  it('a, q, β of x and y and the axial secular frequency match the closed forms', () => {
    const r = iontrail(['check', '--analyzer', 'linear-trap', '--r0', '4mm', '--length', '40mm', '--freq', '1MHz', '--rf', '60V', '--dc', '0.5V', '--end-dc', '10V', '--kappa', '0.05', '--mz', '200', '--json']);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    const m = 200 * u, W = 2 * Math.PI * 1e6, r0 = 4e-3, z0 = 0.02;
    const q = (4 * e * 60) / (m * r0 * r0 * W * W);
    const shift = (-4 * e * 0.05 * 10) / (m * z0 * z0 * W * W);
    const aRod = (8 * e * 0.5) / (m * r0 * r0 * W * W);
    expect(j.q_x).toBeCloseTo(q, 12);
    expect(j.q_y).toBeCloseTo(-q, 12);
    expect(j.a_x).toBeCloseTo(aRod + shift, 12);
    expect(j.a_y).toBeCloseTo(-aRod + shift, 12);
    expect(j.axial_secular_hz).toBeCloseTo(Math.sqrt((2 * e * 0.05 * 10) / (m * z0 * z0)) / (2 * Math.PI), 6);
    for (const [a, b] of [[j.a_x, j.beta_x], [j.a_y, j.beta_y]]) {
      expect(Math.abs(b / Math.sqrt(a + (q * q) / 2) - 1)).toBeLessThan(0.01);
      expect(j.radial_secular_x_hz).toBeGreaterThan(0);
    }
    expect(j.radial_secular_x_hz).toBeCloseTo((j.beta_x * 1e6) / 2, 6);
  });
  it('prints the cautions in text form and refuses a voltage without unit in one line, exit 2', () => {
    const ok = iontrail(['check', '--analyzer', 'linear-trap', '--r0', '4mm', '--length', '40mm', '--freq', '1MHz', '--rf', '300V', '--end-dc', '10V', '--kappa', '0.05', '--mz', '200']);
    expect(ok.code).toBe(0);
    // q_x = 0.917 at m/z 200: past the β = 1 edge, so x and y are reported unstable.
    expect(ok.stdout).toMatch(/x \(slotted rods\): a = .*UNSTABLE/);
    expect(ok.stdout).toMatch(/can kill/);
    const bad = iontrail(['check', '--analyzer', 'linear-trap', '--r0', '4mm', '--length', '40mm', '--freq', '1MHz', '--rf', '300V', '--end-dc', '10', '--kappa', '0.05', '--mz', '200']);
    expect(bad.code).toBe(2);
    expect(bad.stderr.trim().split('\n')).toHaveLength(1);
    expect(bad.stderr).toMatch(/--end-dc expects a voltage/);
    const k = iontrail(['check', '--analyzer', 'linear-trap', '--r0', '4mm', '--length', '40mm', '--freq', '1MHz', '--rf', '300V', '--end-dc', '10V', '--kappa', '2', '--mz', '200']);
    expect(k.code).toBe(2);
    expect(k.stderr).toMatch(/--kappa expects .* \(0, 1\]/);
  });
});
