// Design targets a scene may state (top-level `targets:`), against which a report gives its verdict.
// Each key is one figure of merit with the direction that passes; sim/report/verdict.ts evaluates
// them. A target that does not apply to the scene's analyzer is reported as not evaluated, not failed.

import type { Field } from './schema.js';

export interface TargetInfo {
  /** What is compared, and which way passes (plain text for the report). */
  meaning: string;
  field: Field;
}

/** The supported target keys, in the order the verdict lists them. */
export const TARGETS = {
  transmission: {
    meaning: 'every species: share of its ions detected at least this (0..1); filter and time of flight: transmission, trap scan: ejected onto the detector',
    field: { kind: 'number', min: 0, max: 1 },
  },
  stored: {
    meaning: 'trap: every species keeps at least this share (0..1) of its ions stored at the end of the run',
    field: { kind: 'number', min: 0, max: 1 },
  },
  resolution_50: {
    meaning: 'resolution m/Δm at 50 % of the peak height at least this: filter peak of the m/z sweep, every species of a trap mass scan',
    field: { kind: 'number', positive: true },
  },
  resolution_10: {
    meaning: 'filter: resolution m/Δm at 10 % of the peak height of the m/z sweep at least this',
    field: { kind: 'number', positive: true },
  },
  resolution_fwhm: {
    meaning: 'time of flight: mass resolution t/(2Δt) at FWHM of every species\' arrival peak at least this',
    field: { kind: 'number', positive: true },
  },
  tau_max: {
    meaning: 'buffer-gas cooling: fitted cooling time constant τ at most this (a time, e.g. 2 ms)',
    field: { kind: 'quantity', dim: 'time', positive: true },
  },
  mz_window_low: {
    meaning: 'the stable m/z range reaches down to this m/z: filter window lower edge, or trap low-mass cut-off, at or below it',
    field: { kind: 'number', positive: true },
  },
  mz_window_high: {
    meaning: 'filter: the m/z window upper edge at or above this m/z (RF only: no upper edge, passes)',
    field: { kind: 'number', positive: true },
  },
  frequency_shift_max: {
    meaning: 'space charge: |secular-frequency shift| along z and r at most this fraction of the single-ion value (e.g. 0.05)',
    field: { kind: 'number', positive: true },
  },
} as const satisfies Record<string, TargetInfo>;

export type TargetKey = keyof typeof TARGETS;
/** Resolved targets: SI numbers (tau_max in s), only the keys the scene gives. */
export type Targets = Partial<Record<TargetKey, number>>;

export const TARGET_KEYS = Object.keys(TARGETS) as TargetKey[];

export const TARGETS_FIELD: Field = {
  kind: 'object',
  fields: Object.fromEntries(TARGET_KEYS.map((k) => [k, TARGETS[k].field])),
};
