// Axis ticks and labels. Nice steps 1, 2, 5 × 10^k (Heckbert, "Nice numbers for graph labels",
// Graphics Gems, 1990); SI prefixes (BIPM, The International System of Units, 9th ed., 2019, table 7).

import { describe, expect, it } from 'vitest';
import { formatWithUnit, logTicks, niceTicks, siScale, tickLabel } from '../../render/common/ticks.js';
import { Axis } from '../../render/plot/axis.js';

describe('ticks', () => {
  it('steps are 1, 2 or 5 times a power of ten and cover the range', () => {
    for (const [lo, hi] of [[0, 3.3e-5], [-4.1e-4, 6.2e-4], [5, 12], [0.0012, 0.0087]] as const) {
      const t = niceTicks(lo, hi);
      const mant = t.step / Math.pow(10, Math.floor(Math.log10(t.step) + 1e-12));
      expect([1, 2, 5]).toContain(Math.round(mant));
      expect(t.min).toBeLessThanOrEqual(lo);
      expect(t.max).toBeGreaterThanOrEqual(hi);
      expect(t.ticks.length).toBeGreaterThanOrEqual(3);
      expect(t.ticks.length).toBeLessThanOrEqual(12);
    }
  });
  it('chooses SI prefixes from table 7 of the SI brochure', () => {
    expect(siScale(3.3e-5)).toEqual({ prefix: 'µ', scale: 1e-6 });
    expect(siScale(4e-3)).toEqual({ prefix: 'm', scale: 1e-3 });
    expect(siScale(20e3)).toEqual({ prefix: 'k', scale: 1e3 });
    expect(siScale(0.5)).toEqual({ prefix: 'm', scale: 1e-3 });
    expect(formatWithUnit(8.333e-7, 's')).toBe('833 ns');
  });
  it('labels a time axis in µs and a position axis in mm', () => {
    const t = new Axis({ label: 'time', unit: 's', min: 0, max: 3.3e-5 });
    expect(t.title).toBe('time (µs)');
    expect(t.ticks.map((k) => k.text)).toContain('10');
    const x = new Axis({ label: 'x', unit: 'm', min: -2.5e-3, max: 2.5e-3 });
    expect(x.title).toBe('x (mm)');
    expect(x.ticks.map((k) => k.text)).toContain('−2');
    expect(tickLabel(0.25, 0.05)).toBe('0.25');
  });
  it('puts log ticks on decades', () => {
    const { major } = logTicks(0.013, 4.2);
    expect(major.filter((v) => Math.abs(Math.log10(v) - Math.round(Math.log10(v))) < 1e-12)).toEqual([0.1, 1]);
  });
});
