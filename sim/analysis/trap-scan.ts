// Mass-selective scans of an RF trap. With the RF amplitude ramped linearly, an ion of m/z leaves
// along z when q_z = 8eV(t)/((m/z)·u·(r0² + 2z0²)·Ω²) reaches the ejection point: the β_z = 1 edge
// of the first stability region (q_z ≈ 0.908 at a_z = 0, March & Todd, Quadrupole Ion Trap Mass
// Spectrometry, 2005) without supplementary fields, or, with a dipolar AC of frequency f_aux, the
// q_z whose secular frequency β_z·f/2 equals f_aux (resonance ejection). Inverting q_z(V) at the
// ejection time gives the m/z scale of the spectrum.

import type { Scene, TrapStage } from '../scene/types.js';
import { isTrap } from '../stages/guards.js';
import { floquet } from '../mathieu/floquet.js';
import { trapAz, trapMzPerVolt, trapQz } from '../mathieu/parameters.js';
import { brentRoot } from '../mathieu/root-find.js';
import { peakOf } from './arrival.js';

/** The ramped trap of a scene, if any. */
export function scanTrap(scene: Scene): TrapStage | undefined {
  return scene.stages.find((s): s is TrapStage => isTrap(s) && s.rf.ramp !== undefined);
}

/** a_z of a trap for an ion (sim/mathieu/parameters.ts). */
function azOf(st: TrapStage, mz: number): number {
  return trapAz(st.r0, st.z0, st.rf.frequency, st.dc, mz);
}

/** q_z at which an ion of the given a_z is ejected: β_z = 1 edge, or β_z = 2 f_aux / f. */
export function ejectionQz(st: TrapStage, az: number): number {
  const betaTarget = st.aux && st.aux.amplitude > 0 ? (2 * st.aux.frequency) / st.rf.frequency : 1;
  const f = (q: number) => {
    const r = floquet(az, q);
    // Past the edge β is undefined: treat as 1 (the boundary value), which keeps the sign change.
    return (r.beta ?? 1) - betaTarget;
  };
  if (betaTarget >= 1) {
    // The β = 1 edge: |tr M| = 2 crossing; bisection on stability.
    let lo = 0.01, hi = 1.2;
    for (let k = 0; k < 80; k++) {
      const mid = 0.5 * (lo + hi);
      if (floquet(az, mid).stable) lo = mid; else hi = mid;
    }
    return 0.5 * (lo + hi);
  }
  return brentRoot(f, 1e-4, 0.9, 1e-12);
}

/** m/z per volt of RF amplitude at ejection: m/z = 8eV/(q_ej u d² Ω²). */
export function mzPerVolt(st: TrapStage, qEject: number): number {
  return trapMzPerVolt(st.r0, st.z0, st.rf.frequency, qEject);
}

function amplitudeAt(st: TrapStage, t: number): number {
  const r = st.rf.ramp!;
  return t >= r.over ? r.to : st.rf.amplitude + ((r.to - st.rf.amplitude) * t) / r.over;
}

export function scanSummary(scene: Scene, ejectTimes: number[][]): Record<string, unknown> | null {
  const st = scanTrap(scene);
  if (!st) return null;
  const qRef = ejectionQz(st, azOf(st, scene.ions[0].mz));
  const k = mzPerVolt(st, qRef);
  const all: number[] = [];
  const species = scene.ions.map((p, i) => {
    const t = ejectTimes[i] ?? [];
    const mzApparent = t.map((ti) => k * amplitudeAt(st, ti));
    all.push(...mzApparent);
    const pk = peakOf(mzApparent);
    const qz = t.map((ti) => trapQz(st.r0, st.z0, st.rf.frequency, amplitudeAt(st, ti), p.mz));
    const qm = qz.length ? qz.reduce((a, b) => a + b, 0) / qz.length : null;
    return {
      population: i, mz: p.mz, ejected: t.length,
      ejection_qz_mean: qm,
      ejection_qz_expected: ejectionQz(st, azOf(st, p.mz)),
      apparent_mz: pk ? pk.centre : null,
      fwhm_mz: pk ? pk.fwhm : null,
      resolution: pk && pk.fwhm > 0 ? pk.centre / pk.fwhm : null,
    };
  });
  // Spectrum: counts in bins of apparent m/z over the scanned range.
  const lo = k * st.rf.amplitude, hi = k * st.rf.ramp!.to;
  const bins = 400;
  const w = (hi - lo) / bins;
  const counts = new Array<number>(bins).fill(0);
  for (const m of all) { const b = Math.floor((m - lo) / w); if (b >= 0 && b < bins) counts[b]++; }
  return {
    mode: st.aux && st.aux.amplitude > 0 ? 'resonance-ejection' : 'instability',
    ejection_qz: qRef,
    mz_per_volt: k,
    scan_rate_mz_per_s: (k * (st.rf.ramp!.to - st.rf.amplitude)) / st.rf.ramp!.over,
    species,
    spectrum: { mz_low: lo, bin_width_mz: w, counts },
  };
}
