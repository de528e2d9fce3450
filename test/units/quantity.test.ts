// Quantities with units at the edges. Scale factors are the SI definitions (BIPM, The International
// System of Units, 9th ed., 2019: prefixes, Table 7) and the exact non-SI definitions
// 1 Torr = 101325/760 Pa, 1 mbar = 100 Pa, 1 Å = 1e-10 m, 1 u = 1.66053906660e-27 kg (CODATA 2018).

import { describe, expect, it } from 'vitest';
import { parseQuantity, QuantityError, formatSI } from '../../sim/units/quantity.js';
import { ATOMIC_MASS_UNIT, BOLTZMANN, ELEMENTARY_CHARGE, ionMassKg } from '../../sim/units/constants.js';

describe('parseQuantity', () => {
  it.each([
    ['4 mm', 'length', 4e-3], ['4mm', 'length', 4e-3], ['2.5 um', 'length', 2.5e-6], ['2.5 µm', 'length', 2.5e-6], ['1 m', 'length', 1],
    ['1.2 MHz', 'frequency', 1.2e6], ['800kHz', 'frequency', 8e5], ['50 Hz', 'frequency', 50],
    ['600V', 'voltage', 600], ['600 V', 'voltage', 600], ['-12 V', 'voltage', -12], ['20 kV', 'voltage', 2e4],
    ['5 eV', 'energy', 5],
    ['1 Pa', 'pressure', 1], ['1 mbar', 'pressure', 100], ['1 Torr', 'pressure', 101325 / 760], ['1 mTorr', 'pressure', 101325 / 760 / 1000],
    ['300 K', 'temperature', 300],
    ['1 s', 'time', 1], ['3 ms', 'time', 3e-3], ['300 us', 'time', 3e-4], ['300 µs', 'time', 3e-4], ['5 ns', 'time', 5e-9],
    ['90 deg', 'angle', Math.PI / 2], ['1 rad', 'angle', 1],
    ['1 m^2', 'area', 1], ['150 A^2', 'area', 150e-20], ['150 Å^2', 'area', 150e-20], ['2 nm^2', 'area', 2e-18],
    ['1.5e3 V', 'voltage', 1500], ['.5 mm', 'length', 5e-4],
  ] as const)('%s as %s', (text, dim, expected) => {
    expect(parseQuantity(text, dim, 'x')).toBeCloseTo(expected, 15);
    expect(Math.abs(parseQuantity(text, dim, 'x') / expected - 1)).toBeLessThan(1e-15);
  });

  it('names the flag, the expected dimension with an example, and what it got', () => {
    expect(() => parseQuantity('4 mm', 'voltage', '--rf')).toThrow(new QuantityError("--rf expects a voltage such as 600 V, got '4 mm'"));
    expect(() => parseQuantity('600', 'voltage', '--rf')).toThrow(/--rf expects a voltage such as 600 V, got '600' \(no unit\)/);
    expect(() => parseQuantity('600 Q', 'voltage', '--rf')).toThrow(/unknown unit 'Q'/);
    expect(() => parseQuantity('fast', 'frequency', '--freq')).toThrow(/--freq expects a frequency such as 1.2 MHz, got 'fast'/);
    expect(() => parseQuantity(600, 'voltage', 'stages.0.dc')).toThrow(/give the unit/);
  });

  it('formats values with SI prefixes', () => {
    expect(formatSI(1.2e6, 'Hz')).toBe('1.2 MHz');
    expect(formatSI(3e-4, 's')).toBe('300 µs');
    expect(formatSI(4e-3, 'm')).toBe('4 mm');
  });
});

describe('constants (CODATA 2018; e and k_B exact since the 2019 SI)', () => {
  it('has the exact and recommended values', () => {
    expect(ELEMENTARY_CHARGE).toBe(1.602176634e-19);
    expect(BOLTZMANN).toBe(1.380649e-23);
    expect(ATOMIC_MASS_UNIT).toBe(1.6605390666e-27);
  });
  it('ion mass is (m/z)·z·u with the electron mass neglected', () => {
    expect(ionMassKg(502, 1)).toBe(502 * ATOMIC_MASS_UNIT);
    expect(ionMassKg(500, 2)).toBe(1000 * ATOMIC_MASS_UNIT);
    expect(ionMassKg(500, -2)).toBe(1000 * ATOMIC_MASS_UNIT);
  });
});
