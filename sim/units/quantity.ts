// Quantities with units at the edges of the program: CLI flags and scene files give strings such
// as "4 mm", "1.2MHz", "-12 V", "1 mTorr", "150 A^2"; sim/ works in SI only.

import { TORR } from './constants.js';

export type Dimension =
  | 'length' | 'frequency' | 'voltage' | 'energy' | 'pressure' | 'temperature'
  | 'time' | 'angle' | 'area' | 'volume' | 'mass' | 'mobility' | 'dimensionless';

/** SI unit name and an example shown in error messages, per dimension. */
export const DIMENSION_INFO: Record<Dimension, { si: string; example: string }> = {
  length: { si: 'm', example: '4 mm' },
  frequency: { si: 'Hz', example: '1.2 MHz' },
  voltage: { si: 'V', example: '600 V' },
  energy: { si: 'eV', example: '5 eV' },
  pressure: { si: 'Pa', example: '1 mTorr' },
  temperature: { si: 'K', example: '300 K' },
  time: { si: 's', example: '300 us' },
  angle: { si: 'rad', example: '90 deg' },
  area: { si: 'm^2', example: '150 A^2' },
  volume: { si: 'm^3', example: '1.74 A^3' },
  mass: { si: 'kg', example: '28 u' },
  mobility: { si: 'm^2/(V s)', example: '2.1 cm^2/(V s)' },
  dimensionless: { si: '', example: '1.5' },
};

// Scale of each unit to SI (energies stay in eV: the project reports energies in eV).
const UNITS: Record<string, { dim: Dimension; scale: number; offset?: number }> = {
  m: { dim: 'length', scale: 1 }, cm: { dim: 'length', scale: 1e-2 }, mm: { dim: 'length', scale: 1e-3 },
  um: { dim: 'length', scale: 1e-6 }, 'µm': { dim: 'length', scale: 1e-6 }, 'μm': { dim: 'length', scale: 1e-6 },
  nm: { dim: 'length', scale: 1e-9 },
  Hz: { dim: 'frequency', scale: 1 }, kHz: { dim: 'frequency', scale: 1e3 }, MHz: { dim: 'frequency', scale: 1e6 },
  GHz: { dim: 'frequency', scale: 1e9 },
  V: { dim: 'voltage', scale: 1 }, kV: { dim: 'voltage', scale: 1e3 }, mV: { dim: 'voltage', scale: 1e-3 },
  eV: { dim: 'energy', scale: 1 }, meV: { dim: 'energy', scale: 1e-3 }, keV: { dim: 'energy', scale: 1e3 },
  Pa: { dim: 'pressure', scale: 1 }, kPa: { dim: 'pressure', scale: 1e3 }, mPa: { dim: 'pressure', scale: 1e-3 },
  bar: { dim: 'pressure', scale: 1e5 }, mbar: { dim: 'pressure', scale: 100 }, ubar: { dim: 'pressure', scale: 0.1 },
  Torr: { dim: 'pressure', scale: TORR }, torr: { dim: 'pressure', scale: TORR },
  mTorr: { dim: 'pressure', scale: TORR * 1e-3 }, mtorr: { dim: 'pressure', scale: TORR * 1e-3 },
  K: { dim: 'temperature', scale: 1 },
  s: { dim: 'time', scale: 1 }, ms: { dim: 'time', scale: 1e-3 }, us: { dim: 'time', scale: 1e-6 },
  'µs': { dim: 'time', scale: 1e-6 }, 'μs': { dim: 'time', scale: 1e-6 }, ns: { dim: 'time', scale: 1e-9 },
  deg: { dim: 'angle', scale: Math.PI / 180 }, rad: { dim: 'angle', scale: 1 },
  'm^2': { dim: 'area', scale: 1 }, 'cm^2': { dim: 'area', scale: 1e-4 }, 'nm^2': { dim: 'area', scale: 1e-18 },
  'A^2': { dim: 'area', scale: 1e-20 }, 'Å^2': { dim: 'area', scale: 1e-20 }, 'Å²': { dim: 'area', scale: 1e-20 },
  'm^3': { dim: 'volume', scale: 1 }, 'cm^3': { dim: 'volume', scale: 1e-6 },
  'A^3': { dim: 'volume', scale: 1e-30 }, 'Å^3': { dim: 'volume', scale: 1e-30 }, 'Å³': { dim: 'volume', scale: 1e-30 },
  kg: { dim: 'mass', scale: 1 }, u: { dim: 'mass', scale: 1.6605390666e-27 }, Da: { dim: 'mass', scale: 1.6605390666e-27 },
  'm^2/(V s)': { dim: 'mobility', scale: 1 }, 'm^2/(V*s)': { dim: 'mobility', scale: 1 }, 'm^2/Vs': { dim: 'mobility', scale: 1 },
  'cm^2/(V s)': { dim: 'mobility', scale: 1e-4 }, 'cm^2/(V*s)': { dim: 'mobility', scale: 1e-4 },
  'cm^2/Vs': { dim: 'mobility', scale: 1e-4 }, 'cm^2/V/s': { dim: 'mobility', scale: 1e-4 },
};

/** A bad quantity: `message` is one line, ready to print after the file/line/key prefix. */
export class QuantityError extends Error {
  override name = 'QuantityError';
}

const NUMBER = /^([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*(.*)$/;

/** The dimension a unit belongs to, or undefined for an unknown unit. */
export function unitDimension(unit: string): Dimension | undefined {
  return UNITS[unit]?.dim;
}

/**
 * Parse "600V", "600 V", "-12 V", "1.2e6 Hz" into SI (energies in eV).
 * `what` names the flag or key for the error message, e.g. "--rf" or "stages.0.dc".
 * A bare number is accepted only for dimensionless quantities.
 */
export function parseQuantity(text: string | number, dim: Dimension, what: string): number {
  const info = DIMENSION_INFO[dim];
  const expect = dim === 'dimensionless' ? 'a number' : `${article(dim)} ${dim} such as ${info.example}`;
  if (typeof text === 'number') {
    if (dim === 'dimensionless' && Number.isFinite(text)) return text;
    throw new QuantityError(`${what} expects ${expect}, got '${text}' (give the unit)`);
  }
  const s = String(text).trim();
  const m = NUMBER.exec(s);
  if (!m) throw new QuantityError(`${what} expects ${expect}, got '${s}'`);
  const value = Number(m[1]);
  const unit = m[2].trim();
  if (!Number.isFinite(value)) throw new QuantityError(`${what} expects ${expect}, got '${s}'`);
  if (dim === 'dimensionless') {
    if (unit === '') return value;
    throw new QuantityError(`${what} expects a plain number, got '${s}'`);
  }
  if (unit === '') throw new QuantityError(`${what} expects ${expect}, got '${s}' (no unit)`);
  const u = UNITS[unit];
  if (!u) throw new QuantityError(`${what} expects ${expect}, got '${s}' (unknown unit '${unit}')`);
  if (u.dim !== dim) throw new QuantityError(`${what} expects ${expect}, got '${s}'`);
  return value * u.scale + (u.offset ?? 0);
}

function article(word: string): string {
  return /^[aeiou]/.test(word) ? 'an' : 'a';
}

/** Format an SI value with an SI prefix for tables and axis ticks: formatSI(1.2e6, 'Hz') = "1.2 MHz". */
export function formatSI(value: number, unit: string, digits = 4): string {
  if (value === 0 || !Number.isFinite(value)) return `${value} ${unit}`.trim();
  const prefixes: [number, string][] = [
    [1e12, 'T'], [1e9, 'G'], [1e6, 'M'], [1e3, 'k'], [1, ''], [1e-3, 'm'], [1e-6, 'µ'], [1e-9, 'n'], [1e-12, 'p'],
  ];
  const a = Math.abs(value);
  for (const [f, p] of prefixes) {
    if (a >= f * 0.9995) return `${Number((value / f).toPrecision(digits))} ${p}${unit}`;
  }
  return `${value.toPrecision(digits)} ${unit}`;
}
