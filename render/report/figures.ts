// Which figures a report carries, drawn as PNG in memory. Reuses the figure kinds of render/plot
// (stability, traces, cooling, arrival), the software 3D renderer of render/scene3d, and the
// report's own figures in ./figures/. Each figure comes with a caption; every number in the
// pictures is read from the run folder (summary.json, ions table, trajectories).

import { readRunFolder, type RunFolder } from '../../sim/runfolder/index.js';
import type { SceneKind } from '../../sim/report/scene-kind.js';
import { buildFigure, renderFigure, type FigureSpec } from '../plot/index.js';
import { rfStages } from '../plot/scene.js';
import { readRunView } from '../scene3d/runInput.js';
import { renderPng } from '../scene3d/png.js';
import { fateParts, transmissionFigure } from './figures/transmission.js';
import { spectrumFigure } from './figures/spectrum.js';
import { calibrationFigure, reflectronFigure, sourceFocusFigure } from './figures/tof.js';
import { peakShapeFigure, type SweepCurve } from './figures/peak.js';

export interface ReportFigure {
  id: string;
  /** File name inside the bundle (fig-<id>.png). */
  file: string;
  title: string;
  caption: string;
  png: Buffer;
  width: number;
  height: number;
}

export interface FigureInput {
  /** The main run folder. */
  runDir: string;
  /** A run folder with recorded trajectories when the main run has none (a small sample), or null. */
  sampleDir: string | null;
  /** Bundle-relative name of the folder the trajectory figures come from, for the captions. */
  sampleName?: string;
  kind: SceneKind;
  gas: boolean;
  /** Quadrupole m/z sweep around the scene's m/z, when the sweep module is available. */
  sweep?: SweepCurve | null;
  /** Names to show for run folders in figure footers (absolute path → e.g. 'run'). */
  folderNames?: Map<string, string>;
  /** Ions per population in the time traces (default 3). */
  tracesPerPopulation?: number;
  /** Ions drawn in the 3D picture at most (default 60). */
  ions3d?: number;
}

const W = 1100;

/**
 * Up to `n` ion ids of each population: first the earliest ion of each fate present (detected,
 * still stored or in flight, struck), so a few traces show what happened to the species, then the
 * earliest remaining ions. Sorted by id.
 */
export function ionsPerPopulation(run: RunFolder, n: number): number[] {
  const rowsOf = new Map<number, number[]>();
  for (let r = 0; r < run.ions.ion.length; r++) {
    const p = run.ions.population[r];
    const l = rowsOf.get(p) ?? [];
    l.push(r);
    rowsOf.set(p, l);
  }
  const out: number[] = [];
  for (const rows of rowsOf.values()) {
    const pick = new Set<number>();
    for (const fate of ['detected', 'alive', 'hit', 'missed', 'returned']) {
      const r = rows.find((x) => run.ions.fate[x] === fate);
      if (r !== undefined && pick.size < n) pick.add(r);
    }
    for (const r of rows) { if (pick.size >= n) break; pick.add(r); }
    for (const r of pick) out.push(run.ions.ion[r]);
  }
  return out.sort((a, b) => a - b);
}

async function png(spec: FigureSpec, width: number, height: number): Promise<Buffer> {
  return renderFigure(spec, { width, height, format: 'png' });
}

export async function makeFigures(input: FigureInput): Promise<ReportFigure[]> {
  const figs: ReportFigure[] = [];
  const run = await readRunFolder(input.runDir);
  const add = (id: string, title: string, caption: string, data: Buffer, width: number, height: number) =>
    figs.push({ id, file: `fig-${id}.png`, title, caption, png: data, width, height });
  const own = async (id: string, title: string, caption: string, spec: FigureSpec | null, height = 620) => {
    if (spec) add(id, title, caption, await png(spec, W, height), W, height);
  };
  const kindFig = async (id: string, title: string, caption: string, dir: string, kind: string, height: number, values: Record<string, string> = {}) => {
    const { spec } = await buildFigure(dir, { kind, out: `${id}.png`, width: W, height, values: new Map(Object.entries(values)) });
    add(id, title, caption, await png(spec, W, height), W, height);
  };

  // Stability diagram: one per RF stage.
  const rf = rfStages(run.summary);
  for (const st of rf) {
    const id = rf.length > 1 ? `stability-stage${st.index}` : 'stability';
    await kindFig(id, `Stability diagram${rf.length > 1 ? `, stage ${st.index}` : ''}`,
      `First stability region of the ${st.analyzer === 'trap' ? 'trap (z and r stable)' : 'filter (x and y stable)'} with each species' (q, a) at the stage's RF and DC${st.analyzer === 'trap' ? ' at t = 0' : ''}, and the scan line.`,
      input.runDir, 'stability', 760, { stage: String(st.index) });
  }

  // Ion fates / transmission.
  const storage = input.kind === 'trap';
  const fates = fateParts(storage).map((p) => p.label);
  await own('transmission', input.kind === 'quadrupole' ? 'Transmission' : storage ? 'Ions stored' : 'Ion fates',
    `Share of each species' ions by fate at the end of the run (${fates.join(', ')}), one bar per species by m/z; the label over each bar gives the ${storage ? 'stored' : 'detected'} share.`,
    transmissionFigure(run.summary, storage), 560);

  // Quadrupole peak shape from an m/z sweep.
  if (input.kind === 'quadrupole' && input.sweep) {
    await own('peak', 'Peak shape', 'Transmission against m/z at the stage\'s fixed RF and DC (m/z sweep of the scene); dashed line: peak centre; bars: the full width at 50 % (FWHM) and at 10 % of the maximum, between the interpolated crossings the resolution is computed from.',
      peakShapeFigure(input.sweep, run.summary));
  }

  // Buffer-gas cooling.
  if (input.gas && input.kind !== 'trap-scan' && run.hasHistory) {
    const several = (run.summary.species ?? []).length > 1;
    await kindFig('cooling', 'Buffer-gas cooling', several
      ? 'Mean kinetic energy of the ions still stored (log scale): the whole cloud with the exponential of its fitted time constant τ, and each species by m/z in its colour; below, RMS radius and RMS z of the cloud and, dashed, the RMS radius of each species, against time.'
      : 'Mean kinetic energy of the ions still stored (log scale) with its x, y and z parts and the exponential of the fitted time constant τ; below, RMS radius and RMS z of the cloud, against time.', input.runDir, 'cooling', 800);
  }

  // Trap mass scan.
  if (input.kind === 'trap-scan') {
    await own('spectrum', 'Mass spectrum', 'Ions ejected through the end cap, binned by m/z through the calibration of the RF ramp; dashed lines mark the true m/z.', spectrumFigure(run.summary));
  }

  // Time of flight.
  if (input.kind === 'tof-linear' || input.kind === 'tof-reflectron') {
    const detected = run.ions.fate.some((f) => f === 'detected');
    if (detected) {
      // The arrival kind draws one zoomed panel per species when the peaks lie far apart: room for each.
      const nSpecies = new Set(run.ions.population).size;
      await kindFig('arrival', 'Arrival-time spectrum', 'Histogram of the arrival times of detected ions, one colour per species (one zoomed panel per species when the peaks lie far apart).', input.runDir, 'arrival', Math.max(620, 260 + 190 * nSpecies));
      await kindFig('energy', 'Energy at the detector', 'Histogram of the kinetic energy of detected ions at the detector, per species; the axis is the offset from the round energy named in its label, so the spread in eV shows.', input.runDir, 'energy', 620);
    }
    await own('calibration', 'Mass calibration', 'Peak centres against √(m/z) with the least-squares calibration line and its residuals.', calibrationFigure(run.summary), 700);
    await own('source-focus', 'Source space focus', 'Arrival-time offset against start position for each species: the slope shows how far the detector sits from the first-order space focus of the two-field source.', sourceFocusFigure(run));
    await own('reflectron', 'Reflectron energy focusing', 'Arrival-time offset against initial kinetic energy, with the reflectron and for a field-free analyzer of the same mean flight time.', reflectronFigure(run));
  }

  // Trajectories: time traces and a 3D view, from the main run or the trajectory sample.
  const trajDir = run.hasTrajectories ? input.runDir : input.sampleDir;
  if (trajDir) {
    const trajRun = trajDir === input.runDir ? run : await readRunFolder(trajDir);
    const from = trajDir === input.runDir ? '' : ` (from the trajectory sample in ${input.sampleName ?? trajDir})`;
    const ions = ionsPerPopulation(trajRun, input.tracesPerPopulation ?? 3);
    if (ions.length > 0) {
      await kindFig('traces', 'Time traces', `x, y, z and kinetic energy against time of up to ${input.tracesPerPopulation ?? 3} ions of each species (one of each fate that occurs, then the first others), one colour per species${from}.`,
        trajDir, 'traces', 900, { ions: ions.join(',') });
    }
    const n3 = Math.max(1, Math.ceil((input.ions3d ?? 60) / Math.max(1, new Set(trajRun.ions.population).size)));
    const ions3 = ionsPerPopulation(trajRun, n3);
    // The footer names the bundle-relative folder, not the temporary path the bundle is built in.
    const view = { ...(await readRunView(trajDir, { ions: ions3 })), dir: input.folderNames?.get(trajDir) ?? trajDir };
    if (view.traj.t.length > 0) {
      const w = 1200, h = 700;
      const r = renderPng(view, { camera: 'iso', color: 'mz', rods: 'hyperbolic', width: w, height: h });
      add('3d', '3D view', `Electrodes and the trajectories of up to ${ions3.length} ions${from}, coloured by m/z.`, r.png, w, h);
    }
  }
  return figs;
}
