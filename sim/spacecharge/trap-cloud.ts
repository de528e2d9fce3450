// Space-charge figures of an ion cloud held in the ideal 3D RF trap: the single-ion secular
// frequencies (axial z and radial x, about the centroid), the time-averaged RMS sizes and the ions
// lost — the quantities of a capacity curve (shift and loss vs stored charge). The observer below
// samples a coupled run step by step (the engine's coupled flight, or runEnsemble here).

import { cloudMoments, runEnsemble, type Ensemble, type EnsembleHistory, type SpaceChargeSettings } from './ensemble-step.js';
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
  history?: EnsembleHistory;
}

/**
 * Samples a cloud centred on z = 0 after every step of a coupled run: the secular spectra every
 * samplePeriods RF periods, the RMS sizes once per RF period (and at the start and the end).
 */
export class TrapCloudObserver {
  private readonly specZ: SecularSpectrum; private readonly specR: SecularSpectrum;
  private readonly every: number;
  private step = 0;
  private readonly sz: number[] = []; private readonly sr: number[] = [];
  private readonly n0: number;

  constructor(e: Ensemble, private readonly o: Omit<TrapCloudOptions, 'field' | 'spaceCharge'> & { steps: number }) {
    if (!(o.stepsPerCycle >= 20)) throw new RangeError(`steps per RF period must be ≥ 20, got ${o.stepsPerCycle}`);
    const nf = o.spectrumPoints ?? 161;
    this.specZ = new SecularSpectrum(e.n, o.bandZ[0], o.bandZ[1], nf, 0, o.duration, 'z');
    this.specR = new SecularSpectrum(e.n, o.bandR[0], o.bandR[1], nf, 0, o.duration, 'x');
    this.every = Math.max(1, Math.round((o.samplePeriods ?? 0.25) * o.stepsPerCycle));
    this.n0 = countAlive(e);
    this.sample(e);
  }

  onStep(t: number, e: Ensemble): void {
    if (this.step++ % this.every === 0) { this.specZ.add(t, e); this.specR.add(t, e); }
    if (this.step % this.o.stepsPerCycle === 0 || this.step === this.o.steps) this.sample(e);
  }

  private sample(e: Ensemble): void {
    const m = cloudMoments(e);
    this.sz.push(m.sz); this.sr.push(Math.hypot(m.sx, m.sy));
  }

  figures(e: Ensemble, softening: number): TrapCloudFigures {
    let sz = 0, sr = 0, k = 0;
    for (let r = Math.floor(this.sz.length / 2); r < this.sz.length; r++) { sz += this.sz[r]; sr += this.sr[r]; k++; }
    return {
      secularZHz: this.specZ.peak(), secularRHz: this.specR.peak(), rmsZ: sz / k, rmsR: sr / k,
      lost: this.n0 - countAlive(e), softening,
    };
  }
}

export function trapCloudFigures(e: Ensemble, o: TrapCloudOptions): TrapCloudFigures {
  const h = 1 / (o.stepsPerCycle * o.rfHz);
  const steps = Math.ceil(o.duration / h - 1e-9);
  const obs = new TrapCloudObserver(e, { ...o, steps });
  const history = runEnsemble(e, {
    tEnd: o.duration, h, spaceCharge: o.spaceCharge, recordEvery: o.stepsPerCycle,
    external: { kind: 'field', model: o.field },
    onStep: (t, en) => obs.onStep(t, en),
  });
  return { ...obs.figures(e, history.softening), history };
}

function countAlive(e: Ensemble): number {
  let n = 0;
  for (let i = 0; i < e.n; i++) n += e.alive[i];
  return n;
}
