// Everything `iontrail check` reports about one operating point, in SI (frequencies in Hz, not
// angular). Computation only; formatting lives in cli/commands/check.ts.

import { ionMassKg } from '../units/constants.js';
import { floquet } from './floquet.js';
import { defaultZ0, mathieuParameters, mzAtQ, type AxisName, type OperatingPoint } from './parameters.js';
import { wellDepth } from './well-depth.js';
import { firstRegionOnLine } from './scan-line.js';
import { quadrupoleApex } from './boundaries.js';

/** Trade value of the trap's cut-off q_z on a_z = 0 (March & Todd 2005, ch. 2); the exact edge is 0.90805. */
export const DEFAULT_Q_EJECT = 0.908;

export interface AxisReport {
  axis: AxisName;
  a: number;
  q: number;
  stable: boolean;
  /** Exact β from the monodromy matrix; null when unstable. */
  beta: number | null;
  /** Small-q approximation β ≈ √(a + q²/2) (Dehmelt), null where a + q²/2 < 0; for comparison only. */
  betaSmallQ: number | null;
  /** Fundamental secular frequency ω/2π = β f / 2, Hz; null when unstable. */
  secularFrequencyHz: number | null;
  /** First sidebands (Ω ± ω)/2π, Hz; null when unstable. */
  sidebandsHz: [number, number] | null;
  /**
   * Pseudopotential depth per charge, V, and as ion energy, eV (Dehmelt); null when the axis is
   * unstable or a + q²/2 ≤ 0 (no confining well: the formula's number would mean nothing).
   */
  wellDepthV: number | null;
  wellDepthEv: number | null;
  /** |q| < 0.4: the well-depth figure is inside its range of validity. */
  wellDepthValid: boolean;
}

export interface MzWindow {
  /** Lowest m/z inside the first region at this U and V. */
  low: number;
  /** Highest m/z, or null when unbounded (RF only, U = 0). */
  high: number | null;
  /** (low + high) / 2 / (high − low), or null when unbounded. */
  resolution: number | null;
}

export interface OperatingPointReport {
  analyzer: OperatingPoint['analyzer'];
  mz: number;
  charge: number;
  r0: number;
  z0: number | null;
  freq: number;
  rf: number;
  dc: number;
  axes: [AxisReport, AxisReport];
  /** Stable on every axis. */
  stable: boolean;
  /** Stable with β in (0, 1) on every axis. */
  firstRegion: boolean;
  /** m/z range inside the first region along the line a/q = ±2U/V; null when the line misses it. */
  mzWindow: MzWindow | null;
  /**
   * How far this m/z sits inside the window: m/z above the low edge and below the high edge (null
   * when unbounded); null when the m/z is outside the window.
   */
  mzMargin: { below: number; above: number | null } | null;
  /** Trap: low-mass cut-off, m/z with q_z = qEject at this RF amplitude (a_z = 0). */
  lmcoMz: number | null;
  qEject: number | null;
  /** With rfMax: largest m/z reachable (filter: at the apex; trap: at qEject). */
  rfMax: number | null;
  mzMax: number | null;
}

export interface AnalysisOptions {
  /** Trap cut-off q_z (default 0.908). */
  qEject?: number;
  /** Largest RF amplitude of the supply, V zero-to-peak. */
  rfMax?: number;
}

/** Per-axis distance from the centre to the electrodes: r0 (filter x, y; trap r), z0 (trap z). */
function electrodeDistance(p: OperatingPoint, axis: AxisName): number {
  return axis === 'z' ? p.z0 ?? defaultZ0(p.r0) : p.r0;
}

/** Caches of results that depend only on geometry, frequency and voltages (not on m/z). */
const windowCache = new Map<string, MzWindow | null>();
let apexCache: { q: number; a: number } | null = null;

/** m/z window of the analyzer at this U and V (independent of the m/z and charge in p). */
export function mzWindow(p: OperatingPoint): MzWindow | null {
  if (p.rf === 0) return null;
  const key = [p.analyzer, p.r0, p.z0 ?? defaultZ0(p.r0), p.freq, p.rf, p.dc].join(',');
  const hit = windowCache.get(key);
  if (hit !== undefined) return hit;
  // Reference-axis slope a/q: filter 2U/V; trap −2U/V.
  const slope = (p.analyzer === 'quadrupole' ? 2 : -2) * (p.dc / p.rf);
  const line = firstRegionOnLine(p.analyzer, slope);
  let win: MzWindow | null = null;
  if (line) {
    const low = mzAtQ(p, p.rf, line.qHigh); // higher q ↔ lower m/z
    const high = line.qLow > 0 ? mzAtQ(p, p.rf, line.qLow) : null;
    win = { low, high, resolution: high === null ? null : (0.5 * (low + high)) / (high - low) };
  }
  if (windowCache.size > 256) windowCache.clear();
  windowCache.set(key, win);
  return win;
}

/** Apex of the filter's first region (computed once). */
export function cachedQuadrupoleApex(): { q: number; a: number } {
  if (!apexCache) apexCache = quadrupoleApex();
  return apexCache;
}

/** Full report for one operating point. */
export function analyzeOperatingPoint(p: OperatingPoint, options: AnalysisOptions = {}): OperatingPointReport {
  const charge = p.charge ?? 1;
  const omega = 2 * Math.PI * p.freq;
  const mass = ionMassKg(p.mz, charge);
  const axes = mathieuParameters(p).map(({ axis, a, q }): AxisReport => {
    const f = floquet(a, q);
    const small = a + 0.5 * q * q;
    const sec = f.beta === null ? null : (f.beta * p.freq) / 2; // ω = βΩ/2
    const depth = wellDepth(a, q, mass, charge, omega, electrodeDistance(p, axis));
    const hasWell = f.stable && depth.volts > 0;
    return {
      axis, a, q,
      stable: f.stable,
      beta: f.beta,
      betaSmallQ: small >= 0 ? Math.sqrt(small) : null,
      secularFrequencyHz: sec,
      sidebandsHz: sec === null ? null : [p.freq - sec, p.freq + sec],
      wellDepthV: hasWell ? depth.volts : null,
      wellDepthEv: hasWell ? depth.electronVolts : null,
      wellDepthValid: depth.valid,
    };
  }) as [AxisReport, AxisReport];
  const stable = axes.every((x) => x.stable);
  const firstRegion = axes.every((x) => x.stable && x.beta !== null && x.beta < 1);
  const isTrap = p.analyzer === 'trap';
  const qEject = isTrap ? options.qEject ?? DEFAULT_Q_EJECT : null;
  const rfMax = options.rfMax ?? null;
  const win = mzWindow(p);
  const inside = win !== null && p.mz >= win.low && (win.high === null || p.mz <= win.high);
  const mzMargin = inside ? { below: p.mz - win.low, above: win.high === null ? null : win.high - p.mz } : null;
  let mzMax: number | null = null;
  if (rfMax !== null) mzMax = mzAtQ(p, rfMax, isTrap ? qEject! : cachedQuadrupoleApex().q);
  return {
    analyzer: p.analyzer,
    mz: p.mz,
    charge,
    r0: p.r0,
    z0: isTrap ? p.z0 ?? defaultZ0(p.r0) : null,
    freq: p.freq,
    rf: p.rf,
    dc: p.dc,
    axes,
    stable,
    firstRegion,
    mzWindow: win,
    mzMargin,
    lmcoMz: isTrap ? mzAtQ(p, p.rf, qEject!) : null,
    qEject,
    rfMax,
    mzMax,
  };
}
