// Mass-selective scans of an RF trap (3D, or linear with radial ejection). With the RF amplitude
// ramped linearly, an ion of m/z leaves when the Mathieu q of its ejecting coordinate (q_z of the
// 3D trap, 8eV(t)/((m/z)·u·(r0² + 2z0²)·Ω²); q_x of the linear trap, 4eV(t)/((m/z)·u·r0²·Ω²))
// reaches the ejection point: the β = 1 edge of the first stability region (q ≈ 0.908 at a = 0,
// March & Todd, Quadrupole Ion Trap Mass Spectrometry, 2005) without supplementary fields, or,
// with a dipolar AC of frequency f_aux, the q whose secular frequency β·f/2 equals f_aux
// (resonance ejection). Inverting q(V) at the ejection time gives the m/z scale of the spectrum.
// Each kind gives its geometry (StageKind.massScan), so nothing here asks a stage's name.

import type { Scene, Stage } from '../scene/types.js';
import type { MassScanGeometry } from '../stages/kind.js';
import { kindOf } from '../stages/registry.js';
import { floquet } from '../mathieu/floquet.js';
import { brentRoot } from '../mathieu/root-find.js';
import { peakOf } from './arrival.js';

/** The ramped trap of a scene with its scan geometry, if any. */
export function scanTrap(scene: Scene): { stage: Stage; scan: MassScanGeometry } | undefined {
  for (const stage of scene.stages) {
    const scan = kindOf(stage).massScan?.(stage);
    if (scan !== undefined) return { stage, scan };
  }
  return undefined;
}

/** q at which an ion of the given a is ejected: β = 1 edge, or β = 2 f_aux / f. */
export function ejectionQ(g: MassScanGeometry, a: number): number {
  const betaTarget = g.aux && g.aux.amplitude > 0 ? (2 * g.aux.frequency) / g.rf.frequency : 1;
  const f = (q: number) => {
    const r = floquet(a, q);
    // Past the edge β is undefined: treat as 1 (the boundary value), which keeps the sign change.
    return (r.beta ?? 1) - betaTarget;
  };
  if (betaTarget >= 1) {
    // The β = 1 edge: |tr M| = 2 crossing; bisection on stability.
    let lo = 0.01, hi = 1.2;
    for (let k = 0; k < 80; k++) {
      const mid = 0.5 * (lo + hi);
      if (floquet(a, mid).stable) lo = mid; else hi = mid;
    }
    return 0.5 * (lo + hi);
  }
  // A negative a (a linear trap's axial well) makes the smallest q unstable: start the bracket
  // just above the lower edge of the stability region, found by bisection on stability.
  let lo = 1e-4;
  if (!floquet(a, lo).stable) {
    let hi = 0.9;
    for (let k = 0; k < 60; k++) {
      const mid = 0.5 * (lo + hi);
      if (floquet(a, mid).stable) hi = mid; else lo = mid;
    }
    lo = hi;
  }
  return brentRoot(f, lo, 0.9, 1e-12);
}

function amplitudeAt(g: MassScanGeometry, t: number): number {
  const r = g.rf.ramp!;
  return t >= r.over ? r.to : g.rf.amplitude + ((r.to - g.rf.amplitude) * t) / r.over;
}

export function scanSummary(scene: Scene, ejectTimes: number[][]): Record<string, unknown> | null {
  const found = scanTrap(scene);
  if (!found) return null;
  const st = found.scan, key = st.qKey;
  const qRef = ejectionQ(st, st.a(scene.ions[0].mz));
  const k = st.mzPerVolt(qRef);
  const all: number[] = [];
  const species = scene.ions.map((p, i) => {
    const t = ejectTimes[i] ?? [];
    const mzApparent = t.map((ti) => k * amplitudeAt(st, ti));
    all.push(...mzApparent);
    const pk = peakOf(mzApparent);
    const qz = t.map((ti) => st.q(amplitudeAt(st, ti), p.mz));
    const qm = qz.length ? qz.reduce((a, b) => a + b, 0) / qz.length : null;
    return {
      population: i, mz: p.mz, ejected: t.length,
      [`ejection_${key}_mean`]: qm,
      [`ejection_${key}_expected`]: ejectionQ(st, st.a(p.mz)),
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
    [`ejection_${key}`]: qRef,
    mz_per_volt: k,
    scan_rate_mz_per_s: (k * (st.rf.ramp!.to - st.rf.amplitude)) / st.rf.ramp!.over,
    species,
    spectrum: { mz_low: lo, bin_width_mz: w, counts },
  };
}
