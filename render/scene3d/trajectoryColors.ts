// One colour per trajectory, by m/z (continuous ramp, or discrete swatches for a few species) or
// by fate. The legend description travels with the colours so every output labels them the same.

import { FATE_COLORS, FATE_UNKNOWN, mzRamp, type Rgb } from './palette.js';
import type { RunView } from './runInput.js';

export type ColorBy = 'mz' | 'fate';
export const COLOR_BY: readonly ColorBy[] = ['mz', 'fate'];

export interface LegendEntry { label: string; color: Rgb; count: number }
export type Legend =
  | { kind: 'swatches'; title: string; entries: LegendEntry[] }
  | { kind: 'ramp'; title: string; min: number; max: number };

export interface TrajectoryColors {
  /** RGB per trajectory, 0..1. */
  rgb: Float32Array;
  legend: Legend;
}

const fmtMz = (v: number) => (Math.abs(v) >= 100 ? v.toFixed(0) : v.toPrecision(3));

export function trajectoryColors(run: RunView, by: ColorBy): TrajectoryColors {
  const { ionRow } = run.traj;
  const n = ionRow.length;
  const rgb = new Float32Array(3 * n);
  if (by === 'fate') {
    const counts = new Map<string, number>();
    for (let k = 0; k < n; k++) {
      const f = run.fate[ionRow[k]];
      const c = FATE_COLORS[f] ?? FATE_UNKNOWN;
      rgb.set(c, 3 * k);
      counts.set(f, (counts.get(f) ?? 0) + 1);
    }
    const order = ['detected', 'missed', 'hit', 'returned', 'alive'];
    const entries = [...counts.entries()]
      .sort((a, b) => (order.indexOf(a[0]) + 99 * +(order.indexOf(a[0]) < 0)) - (order.indexOf(b[0]) + 99 * +(order.indexOf(b[0]) < 0)))
      .map(([label, count]) => ({ label, count, color: FATE_COLORS[label] ?? FATE_UNKNOWN }));
    return { rgb, legend: { kind: 'swatches', title: 'fate', entries } };
  }
  const values = [...new Set(Array.from(ionRow, (r) => run.mz[r]))].sort((a, b) => a - b);
  const lo = values[0] ?? 0, hi = values[values.length - 1] ?? 1;
  const discrete = values.length <= 6;
  const u = (mz: number) => discrete
    ? (values.length === 1 ? 0 : values.indexOf(mz) / (values.length - 1))
    : (mz - lo) / (hi - lo);
  const tmp = [0, 0, 0];
  for (let k = 0; k < n; k++) {
    mzRamp(u(run.mz[ionRow[k]]), tmp);
    rgb[3 * k] = tmp[0]; rgb[3 * k + 1] = tmp[1]; rgb[3 * k + 2] = tmp[2];
  }
  if (discrete) {
    const entries = values.map((v) => {
      const c = mzRamp(u(v), [0, 0, 0]) as number[];
      let count = 0;
      for (let k = 0; k < n; k++) if (run.mz[ionRow[k]] === v) count++;
      return { label: `m/z ${fmtMz(v)}`, color: [c[0], c[1], c[2]] as Rgb, count };
    });
    return { rgb, legend: { kind: 'swatches', title: 'm/z', entries } };
  }
  return { rgb, legend: { kind: 'ramp', title: 'm/z', min: lo, max: hi } };
}
