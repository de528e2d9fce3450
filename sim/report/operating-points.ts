// The operating-point table of a report: for every RF stage (quadrupole filter or trap) and every
// ion population, the Mathieu a and q, exact β, secular frequency, Dehmelt well depth and the m/z
// window (filter) or low-mass cut-off (trap), all from sim/mathieu/operating-point.ts. A stage with
// an RF ramp gets a row at the start and one at the end of the ramp: the window moves with V.

import { analyzeOperatingPoint, type OperatingPointReport } from '../mathieu/operating-point.js';
import type { Scene, QuadrupoleStage, TrapStage } from '../scene/types.js';

export interface OperatingPointAxis {
  axis: string;
  a: number;
  q: number;
  stable: boolean;
  /** Exact β (Floquet monodromy); null when unstable. */
  beta: number | null;
  secular_frequency_hz: number | null;
  /** Dehmelt pseudopotential depth, V per charge; meaningful for |q| < 0.4 (well_depth_valid). */
  well_depth_v: number;
  well_depth_ev: number;
  well_depth_valid: boolean;
}

export interface OperatingPointRow {
  stage: number;
  analyzer: 'quadrupole' | 'trap';
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

function rfStage(s: Scene['stages'][number]): s is QuadrupoleStage | TrapStage {
  return s.type === 'quadrupole' || s.type === 'trap';
}

function row(stage: number, st: QuadrupoleStage | TrapStage, at: OperatingPointRow['at'], rf: number, pop: number, mz: number, charge: number): OperatingPointRow {
  const r: OperatingPointReport = analyzeOperatingPoint({
    analyzer: st.type, r0: st.r0, z0: st.type === 'trap' ? st.z0 : undefined,
    freq: st.rf.frequency, rf, dc: st.dc, mz, charge,
  });
  return {
    stage, analyzer: st.type, at, population: pop, mz, charge,
    rf_v: rf, dc_v: st.dc, freq_hz: st.rf.frequency,
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
    if (!rfStage(st)) return;
    const stage = index; // index into the resolved stages, as `iontrail plot --kind stability --stage`
    scene.ions.forEach((p, k) => {
      // A ramp of zero length is no ramp; RF 0 V has no Mathieu point worth a row.
      if (st.rf.ramp && st.rf.ramp.to !== st.rf.amplitude) {
        if (st.rf.amplitude > 0) rows.push(row(stage, st, 'ramp start', st.rf.amplitude, k, p.mz, p.charge));
        rows.push(row(stage, st, 'ramp end', st.rf.ramp.to, k, p.mz, p.charge));
      } else if (st.rf.amplitude > 0) {
        rows.push(row(stage, st, 'fixed', st.rf.amplitude, k, p.mz, p.charge));
      }
    });
  });
  return rows;
}
