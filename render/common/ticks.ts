// Axis ticks: "nice" steps of 1, 2 or 5 × 10^k (Heckbert, "Nice numbers for graph labels",
// Graphics Gems, 1990), SI prefixes chosen per axis so labels read 0, 50, 100 µs rather than
// 5e-05 s, and decades for log axes.

export interface SiScale {
  /** Prefix symbol ('' for none, 'µ', 'm', 'k', ...). */
  prefix: string;
  /** Multiply an SI value by 1/scale to get the labelled number. */
  scale: number;
}

const PREFIXES: [number, string][] = [
  [-15, 'f'], [-12, 'p'], [-9, 'n'], [-6, 'µ'], [-3, 'm'], [0, ''], [3, 'k'], [6, 'M'], [9, 'G'], [12, 'T'],
];

/** Engineering prefix for numbers of magnitude `maxAbs` (labels then lie in [1, 1000)). */
export function siScale(maxAbs: number): SiScale {
  if (!(maxAbs > 0) || !Number.isFinite(maxAbs)) return { prefix: '', scale: 1 };
  const e3 = Math.floor(Math.log10(maxAbs) / 3 + 1e-9) * 3;
  const clamped = Math.max(-15, Math.min(12, e3));
  const p = PREFIXES.find(([e]) => e === clamped)!;
  return { prefix: p[1], scale: Math.pow(10, clamped) };
}

/** Step of about range/target rounded to 1, 2, 5 × 10^k. */
export function niceStep(range: number, target: number): number {
  const raw = range / Math.max(1, target);
  if (!(raw > 0) || !Number.isFinite(raw)) return 1;
  const mag = Math.pow(10, Math.floor(Math.log10(raw)));
  const f = raw / mag;
  return (f < 1.5 ? 1 : f < 3 ? 2 : f < 7 ? 5 : 10) * mag;
}

/** Range widened to whole steps, and the ticks inside it. */
export function niceTicks(min: number, max: number, target = 6, minStep = 0): { min: number; max: number; step: number; ticks: number[] } {
  if (!(max > min)) {
    const pad = min === 0 ? 1 : Math.abs(min) * 0.1;
    min -= pad; max += pad;
  }
  const step = Math.max(minStep, niceStep(max - min, target));
  const lo = Math.floor(min / step + 1e-9) * step;
  const hi = Math.ceil(max / step - 1e-9) * step;
  const ticks: number[] = [];
  for (let k = 0; lo + k * step <= hi + step * 1e-9; k++) ticks.push(clean(lo + k * step, step));
  return { min: lo, max: hi, step, ticks };
}

/** Ticks inside [min, max] without widening the range. */
export function ticksWithin(min: number, max: number, target = 6, minStep = 0): { step: number; ticks: number[] } {
  const step = Math.max(minStep, niceStep(max - min, target));
  const ticks: number[] = [];
  for (let v = Math.ceil(min / step - 1e-9) * step; v <= max + step * 1e-9; v += step) ticks.push(clean(v, step));
  return { step, ticks };
}

function clean(v: number, step: number): number {
  const r = Math.round(v / step) * step;
  return Math.abs(r) < step * 1e-9 ? 0 : Number(r.toPrecision(12));
}

/** Label of a tick value already divided by the axis scale, with as many decimals as the step needs. */
export function tickLabel(v: number, step: number): string {
  const decimals = Math.max(0, Math.min(10, -Math.floor(Math.log10(step) + 1e-9)));
  const s = v.toFixed(decimals);
  return s === '-0' || /^-0\.0*$/.test(s) ? s.slice(1) : s.replace('-', '−');
}

/** Decade ticks (10^k) inside [min, max] (both > 0), plus 2× and 5× when there are few decades. */
export function logTicks(min: number, max: number): { major: number[]; minor: number[] } {
  const k0 = Math.floor(Math.log10(min)), k1 = Math.ceil(Math.log10(max));
  const major: number[] = [], minor: number[] = [];
  for (let k = k0; k <= k1; k++) {
    const d = Math.pow(10, k);
    if (d >= min * (1 - 1e-9) && d <= max * (1 + 1e-9)) major.push(Number(d.toPrecision(12)));
    for (let m = 2; m <= 9; m++) {
      const v = m * d;
      if (v >= min && v <= max) minor.push(Number(v.toPrecision(12)));
    }
  }
  if (major.length < 3) {
    for (const v of minor) {
      const lead = Math.round(v / Math.pow(10, Math.floor(Math.log10(v) + 1e-9)));
      if (lead === 2 || lead === 5) major.push(v);
    }
    major.sort((a, b) => a - b);
  }
  return { major, minor: minor.filter((v) => !major.includes(v)) };
}

/** Compact label of a log-axis tick in the axis unit (0.01, 0.1, 1, 10, 1e-5, 2e6). */
export function logTickLabel(v: number): string {
  const e = Math.floor(Math.log10(v) + 1e-9);
  if (e >= -3 && e <= 4) return String(Number(v.toPrecision(6)));
  return Number(v.toPrecision(3)).toExponential().replace('e+', 'e').replace('-', '−');
}

/** A value with an SI prefix and unit, e.g. formatWithUnit(1.5e-4, 's') → "150 µs". */
export function formatWithUnit(v: number, unit: string, digits = 3): string {
  const s = siScale(Math.abs(v));
  return `${Number((v / s.scale).toPrecision(digits))} ${s.prefix}${unit}`;
}
