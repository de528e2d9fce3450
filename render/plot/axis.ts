// One axis of a panel: data range, linear or log mapping to pixels, ticks and the label with its
// SI-prefixed unit ("time (µs)", "x (mm)", "kinetic energy (eV)").

import { logTickLabel, logTicks, niceTicks, siScale, tickLabel, ticksWithin, type SiScale } from '../common/ticks.js';

export interface AxisSpec {
  /** Quantity name, e.g. "time", "x", "q". */
  label: string;
  /** SI unit of the data ('' for dimensionless); gets a prefix unless `prefix` is false. */
  unit: string;
  min: number;
  max: number;
  log?: boolean;
  /** Widen the range to whole tick steps (default true for linear axes). */
  nice?: boolean;
  /** Use an SI prefix on the unit (default true when unit is not ''). */
  prefix?: boolean;
  /** Counts: tick steps of at least 1. */
  integer?: boolean;
  /** Label of each tick instead of its number (a category axis: species by m/z); '' leaves it unlabelled. */
  tickText?: (value: number) => string;
}

export interface Tick { value: number; text: string; major: boolean }

export class Axis {
  readonly min: number;
  readonly max: number;
  readonly log: boolean;
  readonly si: SiScale;
  readonly ticks: Tick[];
  readonly title: string;

  constructor(spec: AxisSpec) {
    this.log = spec.log ?? false;
    let min = spec.min, max = spec.max;
    if (!Number.isFinite(min) || !Number.isFinite(max)) { min = 0; max = 1; }
    if (this.log) {
      if (!(min > 0)) min = max > 0 ? max * 1e-3 : 1e-3;
      if (!(max > min)) max = min * 10;
      this.min = min; this.max = max;
      this.si = { prefix: '', scale: 1 };
      const { major, minor } = logTicks(min, max);
      this.ticks = [
        ...major.map((v) => ({ value: v, text: logTickLabel(v), major: true })),
        ...minor.map((v) => ({ value: v, text: '', major: false })),
      ];
    } else {
      const usePrefix = spec.prefix ?? spec.unit !== '';
      if (spec.nice ?? true) {
        const t = niceTicks(min, max, 6, spec.integer ? 1 : 0);
        min = t.min; max = t.max;
      } else if (!(max > min)) {
        const pad = min === 0 ? 1 : Math.abs(min) * 0.1;
        min -= pad; max += pad;
      }
      this.min = min; this.max = max;
      const { step, ticks } = ticksWithin(min, max, 6, spec.integer ? 1 : 0);
      this.si = usePrefix ? siScale(Math.max(Math.abs(min), Math.abs(max))) : { prefix: '', scale: 1 };
      const text = spec.tickText;
      this.ticks = ticks.map((v) => ({ value: v, text: text ? text(v) : tickLabel(v / this.si.scale, step / this.si.scale), major: true }));
    }
    const unit = spec.unit === '' ? '' : `${this.si.prefix}${spec.unit}`;
    this.title = unit === '' ? spec.label : `${spec.label} (${unit})`;
  }

  /** Fraction 0..1 along the axis. */
  frac(v: number): number {
    return this.log
      ? (Math.log10(v) - Math.log10(this.min)) / (Math.log10(this.max) - Math.log10(this.min))
      : (v - this.min) / (this.max - this.min);
  }
}

/** Data range of some arrays, ignoring non-finite values (and values ≤ 0 when `positive`). */
export function extent(arrays: ArrayLike<number>[], positive = false): [number, number] {
  let lo = Infinity, hi = -Infinity;
  for (const a of arrays) {
    for (let i = 0; i < a.length; i++) {
      const v = a[i];
      if (!Number.isFinite(v) || (positive && v <= 0)) continue;
      if (v < lo) lo = v;
      if (v > hi) hi = v;
    }
  }
  return lo <= hi ? [lo, hi] : [0, 1];
}

/** Range widened by a fraction on both sides (for scatter data that should not touch the frame). */
export function padded([lo, hi]: [number, number], f = 0.04): [number, number] {
  const d = hi - lo || Math.abs(hi) || 1;
  return [lo - f * d, hi + f * d];
}
