// Colours of the trajectories, one RGB per recorded point: along each trajectory by time of flight
// or kinetic energy (the default look: a perceptually ordered map with a labelled colour bar), or
// one colour per ion by m/z (ramp, or swatches for a few species) or by fate. The legend travels
// with the colours so every output labels them the same.

import { FATE_NAMES } from '../../sim/core/batch.js';
import { ATOMIC_MASS_UNIT, ELEMENTARY_CHARGE } from '../../sim/units/constants.js';
import { fateColor, mzRamp, valueRamp, type Rgb } from './palette.js';
import { speciesRamp } from '../common/species.js';
import type { RunView } from './runInput.js';

export type ColorBy = 'time' | 'energy' | 'mz' | 'fate';
export const COLOR_BY: readonly ColorBy[] = ['time', 'energy', 'mz', 'fate'];
export const DEFAULT_COLOR_BY: ColorBy = 'time';

export interface LegendEntry { label: string; color: Rgb; count: number }
export type Legend =
  | { kind: 'swatches'; title: string; entries: LegendEntry[] }
  | {
    kind: 'ramp'; title: string;
    /** Range shown, in `unit`. */
    min: number; max: number; unit: string;
    /** The colour map: the species ramp (m/z) or the value map (time, energy). */
    map: (u: number, out?: number[]) => number[] | Float32Array;
    /** Values above `max` exist and take its colour. */
    clippedTop?: boolean;
  };

export interface TrajectoryColors {
  /** RGB per recorded point (3 per point of run.traj), 0..1. */
  rgb: Float32Array;
  legend: Legend;
}

const fmtMz = (v: number) => (Math.abs(v) >= 100 ? v.toFixed(0) : v.toPrecision(3));

/** Fates in the engine's order (sim/core/batch.ts), then any other name the run folder holds. */
export function fateOrder(names: Iterable<string>): string[] {
  const known: readonly string[] = FATE_NAMES;
  const seen = [...new Set(names)];
  return [...known.filter((f) => seen.includes(f)), ...seen.filter((f) => !known.includes(f)).sort()];
}

export function trajectoryColors(run: RunView, by: ColorBy): TrajectoryColors {
  if (by === 'time') return byTime(run);
  if (by === 'energy') return byEnergy(run);
  const { ionRow } = run.traj;
  const n = ionRow.length;
  const per = new Float32Array(3 * n);
  let legend: Legend;
  if (by === 'fate') {
    const counts = new Map<string, number>();
    for (let k = 0; k < n; k++) {
      const f = run.fate[ionRow[k]];
      per.set(fateColor(f), 3 * k);
      counts.set(f, (counts.get(f) ?? 0) + 1);
    }
    const entries = fateOrder(counts.keys()).map((label) => ({ label, count: counts.get(label)!, color: fateColor(label) }));
    legend = { kind: 'swatches', title: 'fate', entries };
  } else {
    legend = byMz(run, per);
  }
  return { rgb: spread(run, per), legend };
}

function byMz(run: RunView, per: Float32Array): Legend {
  const { ionRow } = run.traj;
  const n = ionRow.length;
  // The same species colours as the 2D figures (render/common/species.ts).
  const { u, values, discrete } = speciesRamp(Array.from(ionRow, (r) => run.mz[r]));
  const lo = values[0] ?? 0, hi = values[values.length - 1] ?? 1;
  for (let k = 0; k < n; k++) mzRamp(u(run.mz[ionRow[k]]), per.subarray(3 * k, 3 * k + 3));
  if (!discrete) return { kind: 'ramp', title: 'm/z', min: lo, max: hi, unit: '', map: mzRamp };
  const entries = values.map((v) => {
    const c = mzRamp(u(v), [0, 0, 0]) as number[];
    let count = 0;
    for (let k = 0; k < n; k++) if (run.mz[ionRow[k]] === v) count++;
    return { label: `m/z ${fmtMz(v)}`, color: [c[0], c[1], c[2]] as Rgb, count };
  });
  return { kind: 'swatches', title: 'm/z', entries };
}

/** One colour per trajectory copied to each of its points. */
function spread(run: RunView, per: Float32Array): Float32Array {
  const { start } = run.traj;
  const rgb = new Float32Array(3 * run.traj.t.length);
  for (let k = 0; k + 1 < start.length; k++) {
    for (let i = start[k]; i < start[k + 1]; i++) { rgb[3 * i] = per[3 * k]; rgb[3 * i + 1] = per[3 * k + 1]; rgb[3 * i + 2] = per[3 * k + 2]; }
  }
  return rgb;
}

/** Time unit that keeps the largest time between 1 and 1000. */
export function timeUnit(tMax: number): { scale: number; unit: string } {
  return tMax >= 1e-3 ? { scale: 1e3, unit: 'ms' } : tMax >= 1e-6 ? { scale: 1e6, unit: 'µs' } : { scale: 1e9, unit: 'ns' };
}

function mapValues(v: Float64Array, lo: number, hi: number): Float32Array {
  const rgb = new Float32Array(3 * v.length);
  const inv = hi > lo ? 1 / (hi - lo) : 0;
  for (let i = 0; i < v.length; i++) valueRamp((v[i] - lo) * inv, rgb, 3 * i);
  return rgb;
}

function byTime(run: RunView): TrajectoryColors {
  const { t } = run.traj;
  let lo = Infinity, hi = -Infinity;
  for (let i = 0; i < t.length; i++) { if (t[i] < lo) lo = t[i]; if (t[i] > hi) hi = t[i]; }
  // Ions start at t = 0 of the run (each carries the run's clock), so the bar starts there.
  lo = Math.min(0, lo);
  if (!(hi > lo)) hi = lo + 1e-9;
  const { scale, unit } = timeUnit(hi);
  return { rgb: mapValues(t, lo, hi), legend: { kind: 'ramp', title: 'time of flight', unit, min: lo * scale, max: hi * scale, map: valueRamp } };
}

/** Upper end of the energy bar: the 99th percentile, so a few ions heated on the way to an electrode do not wash out the rest. */
export const ENERGY_PERCENTILE = 0.99;

function byEnergy(run: RunView): TrajectoryColors {
  const { vx, vy, vz, start, ionRow } = run.traj;
  if (!vx || !vy || !vz) throw new Error('colouring by energy needs the velocities (readRunView with velocities: true)');
  const ke = new Float64Array(vx.length);
  for (let k = 0; k + 1 < start.length; k++) {
    const row = ionRow[k];
    // m = (m/z)·|z|·u (DESIGN.md; electron mass neglected); E = ½ m v² in eV.
    const halfMOverE = 0.5 * run.mz[row] * Math.abs(run.charge[row] || 1) * ATOMIC_MASS_UNIT / ELEMENTARY_CHARGE;
    for (let i = start[k]; i < start[k + 1]; i++) ke[i] = halfMOverE * (vx[i] * vx[i] + vy[i] * vy[i] + vz[i] * vz[i]);
  }
  let lo = Infinity, max = 0;
  for (let i = 0; i < ke.length; i++) { if (ke[i] < lo) lo = ke[i]; if (ke[i] > max) max = ke[i]; }
  if (!Number.isFinite(lo)) lo = 0;
  // Percentile from an evenly strided sample of at most 200 000 points (sorting millions is slow).
  const stride = Math.max(1, Math.floor(ke.length / 200_000));
  const sample = new Float64Array(Math.ceil(ke.length / stride));
  for (let i = 0, j = 0; i < ke.length; i += stride) sample[j++] = ke[i];
  sample.sort();
  let hi = sample.length ? sample[Math.min(sample.length - 1, Math.floor(ENERGY_PERCENTILE * sample.length))] : 1;
  if (!(hi > lo)) hi = max > lo ? max : lo + 1;
  return {
    rgb: mapValues(ke, lo, hi),
    legend: { kind: 'ramp', title: 'kinetic energy', unit: 'eV', min: lo, max: hi, map: valueRamp, clippedTop: max > hi },
  };
}
