// Scene-file keys shared by several blocks (stage kinds, the top level): the RF drive, a gas
// block, lengths and apertures, each with its dimension for the unit checks.

import type { Field } from './schema.js';
import type { RfDrive } from '../stages/base.js';

export const RF_FIELD: Field = {
  kind: 'object',
  fields: {
    amplitude: { kind: 'quantity', dim: 'voltage', nonNegative: true },
    frequency: { kind: 'quantity', dim: 'frequency', positive: true },
    phase: { kind: 'quantity', dim: 'angle' },
    ramp: {
      kind: 'object',
      fields: { to: { kind: 'quantity', dim: 'voltage', nonNegative: true }, over: { kind: 'quantity', dim: 'time', positive: true } },
      required: ['to', 'over'],
    },
  },
  required: ['amplitude', 'frequency'],
};

export const GAS_FIELD: Field = {
  kind: 'object',
  fields: {
    species: { kind: 'string' },
    mass: { kind: 'quantity', dim: 'mass', positive: true },
    polarizability: { kind: 'quantity', dim: 'volume', nonNegative: true },
    pressure: { kind: 'quantity', dim: 'pressure', positive: true },
    temperature: { kind: 'quantity', dim: 'temperature', positive: true },
    model: { kind: 'enum', values: ['hard-sphere', 'drag'] },
    cross_section: { kind: 'quantity', dim: 'area', positive: true },
    reduced_mobility: { kind: 'quantity', dim: 'mobility', positive: true },
  },
  required: ['pressure', 'temperature', 'model'],
};

export const LENGTH_FIELD = { kind: 'quantity', dim: 'length', positive: true } as const;
export const APERTURE_FIELD = { kind: 'quantity', dim: 'length', positive: true } as const;
export const VOLTAGE_FIELD = { kind: 'quantity', dim: 'voltage' } as const;

/** A validated `rf:` block in SI. */
export function resolveRf(r: Record<string, any>): RfDrive {
  const out: RfDrive = { amplitude: r.amplitude, frequency: r.frequency, phase: r.phase ?? 0 };
  if (r.ramp) out.ramp = { to: r.ramp.to, over: r.ramp.over };
  return out;
}
