// The operating-point table of a report: for every RF stage (quadrupole filter or trap) and every
// ion population, the Mathieu a and q, exact β, secular frequency, Dehmelt well depth and the m/z
// window (filter) or low-mass cut-off (trap), all from sim/mathieu/operating-point.ts. A stage with
// an RF ramp gets a row at the start and one at the end of the ramp: the window moves with V.

import { analyzeOperatingPoint, type OperatingPointReport } from '../mathieu/operating-point.js';
import type { Scene } from '../scene/types.js';
import type { Analyzer } from '../mathieu/parameters.js';
import type { StageKind } from '../stages/kind.js';
import { kindOf, rfOf } from '../stages/registry.js';

export interface OperatingPointAxis {
  axis: string;
  a: number;
  q: number;
  stable: boolean;
  /** Exact β (Floquet monodromy); null when unstable. */
  beta: number | null;
  secular_frequency_hz: number | null;
  /** Dehmelt pseudopotential depth, V per charge; meaningful for |q| < 0.4 (well_depth_valid); null on an unstable axis. */
  well_depth_v: number | null;
  well_depth_ev: number | null;
  well_depth_valid: boolean;
}

export interface OperatingPointRow {
  stage: number;
  analyzer: Analyzer;
  /** 'fixed' for a constant RF amplitude; 'ramp start' / 'ramp end' for a ramped one. */
  at: 'fixed' | 'ramp start' | 'ramp end';
  population: number;
  mz: number;
  charge: number;
  rf_v: number;
  dc_v: number;
  freq_hz: number;
  stable: boolean;
  first_region: boolean;
  axes: OperatingPointAxis[];
  /** Filter: m/z window along the scan line (high null when unbounded). Trap: the same for the trap line. */
  mz_window: { low: number; high: number | null; resolution: number | null } | null;
  /** Trap only: low-mass cut-off m/z at q_z = q_eject, a_z = 0. */
  lmco_mz: number | null;
  q_eject: number | null;
}

type Geometry = NonNullable<ReturnType<NonNullable<StageKind['operatingPoint']>>>;

function row(stage: number, g: Geometry, at: OperatingPointRow['at'], rf: number, pop: number, mz: number, charge: number): OperatingPointRow {
  const r: OperatingPointReport = analyzeOperatingPoint({ ...g, rf, mz, charge });
  return {
    stage, analyzer: g.analyzer, at, population: pop, mz, charge,
    rf_v: rf, dc_v: g.dc, freq_hz: g.freq,
    stable: r.stable, first_region: r.firstRegion,
    axes: r.axes.map((x) => ({
      axis: x.axis, a: x.a, q: x.q, stable: x.stable, beta: x.beta,
      secular_frequency_hz: x.secularFrequencyHz,
      well_depth_v: x.wellDepthV, well_depth_ev: x.wellDepthEv, well_depth_valid: x.wellDepthValid,
    })),
    mz_window: r.mzWindow,
    lmco_mz: r.lmcoMz,
    q_eject: r.qEject,
  };
}

/** One row per (RF stage, population[, ramp end]); empty for scenes without RF. */
export function operatingPointRows(scene: Scene): OperatingPointRow[] {
  const rows: OperatingPointRow[] = [];
  scene.stages.forEach((st, index) => {
    const g = kindOf(st).operatingPoint?.(st);
    const drive = rfOf(st);
    if (g === undefined || drive === undefined) return;
    const stage = index; // index into the resolved stages, as `iontrail plot --kind stability --stage`
    scene.ions.forEach((p, k) => {
      // A ramp of zero length is no ramp; RF 0 V has no Mathieu point worth a row.
      if (drive.ramp && drive.ramp.to !== drive.amplitude) {
        if (drive.amplitude > 0) rows.push(row(stage, g, 'ramp start', drive.amplitude, k, p.mz, p.charge));
        rows.push(row(stage, g, 'ramp end', drive.ramp.to, k, p.mz, p.charge));
      } else if (drive.amplitude > 0) {
        rows.push(row(stage, g, 'fixed', drive.amplitude, k, p.mz, p.charge));
      }
    });
  });
  return rows;
}
