// Space-charge figures of an ion cloud held in the ideal 3D RF trap: the single-ion secular
// frequencies (axial z and radial x, about the centroid), the time-averaged RMS sizes and the ions
// lost — the quantities of a capacity curve (shift and loss vs stored charge). One coupled run.

import { runEnsemble, type Ensemble, type EnsembleHistory, type SpaceChargeSettings } from './ensemble-step.js';
import { SecularSpectrum } from './spectrum.js';
import type { FieldModel } from '../core/field-model.js';

export interface TrapCloudOptions {
  /** The trap's field model (sim/stages/trap/field.ts), centred on z = 0, and its RF frequency, Hz. */
  field: FieldModel; rfHz: number;
  /** Run length, s, and steps per RF period (≥ 20; 40 recommended). */
  duration: number; stepsPerCycle: number;
  spaceCharge: SpaceChargeSettings | null;
  /** Search bands for the axial and radial lines, Hz (e.g. 0.5…1.2 × β Ω/(4π) of each axis). */
  bandZ: [number, number]; bandR: [number, number];
  /** Grid points per band (default 161) and RF periods between spectrum samples (default 0.25). */
  spectrumPoints?: number; samplePeriods?: number;
}

export interface TrapCloudFigures {
  secularZHz: number; secularRHz: number;
  /** RMS sizes, m, averaged over the second half of the run (transients of the start excluded). */
  rmsZ: number; rmsR: number;
  lost: number; softening: number;
  history: EnsembleHistory;
}

export function trapCloudFigures(e: Ensemble, o: TrapCloudOptions): TrapCloudFigures {
  if (!(o.stepsPerCycle >= 20)) throw new RangeError(`steps per RF period must be ≥ 20, got ${o.stepsPerCycle}`);
  const nf = o.spectrumPoints ?? 161;
  const specZ = new SecularSpectrum(e.n, o.bandZ[0], o.bandZ[1], nf, 0, o.duration, 'z');
  const specR = new SecularSpectrum(e.n, o.bandR[0], o.bandR[1], nf, 0, o.duration, 'x');
  const every = Math.max(1, Math.round((o.samplePeriods ?? 0.25) * o.stepsPerCycle));
  const n0 = countAlive(e);
  let step = 0;
  const history = runEnsemble(e, {
    tEnd: o.duration, h: 1 / (o.stepsPerCycle * o.rfHz), spaceCharge: o.spaceCharge,
    recordEvery: o.stepsPerCycle,
    external: { kind: 'field', model: o.field },
    onStep: (t, en) => { if (step++ % every === 0) { specZ.add(t, en); specR.add(t, en); } },
  });
  let sz = 0, sr = 0, k = 0;
  for (let r = Math.floor(history.t.length / 2); r < history.t.length; r++) {
    sz += history.sz[r]; sr += Math.hypot(history.sx[r], history.sy[r]); k++;
  }
  return {
    secularZHz: specZ.peak(), secularRHz: specR.peak(), rmsZ: sz / k, rmsR: sr / k,
    lost: n0 - countAlive(e), softening: history.softening, history,
  };
}

function countAlive(e: Ensemble): number {
  let n = 0;
  for (let i = 0; i < e.n; i++) n += e.alive[i];
  return n;
}
