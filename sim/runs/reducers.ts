// The summaries of a run as reducers over the engine's batch results, fed in batch order: each
// keeps its own sums, so adding a figure means adding a reducer here, not editing the engine.

import type { Scene } from '../scene/types.js';
import type { SpeciesSummary, RunSummary } from '../runfolder/summary.js';
import { Fate } from '../core/batch.js';
import type { BatchResult } from '../engine/track.js';
import type { EnsembleHistory } from '../engine/history.js';
import { fitCooling } from '../analysis/cooling.js';
import { isTimeOfFlight, tofSummary } from '../analysis/tof-summary.js';
import { scanSummary, scanTrap } from '../analysis/trap-scan.js';

export interface BatchReducer {
  add(r: BatchResult): void;
}

/** Ion fates per population, collisions and the mean energy of the ions still stored. */
export class SpeciesTally implements BatchReducer {
  private readonly pops;
  constructor(scene: Scene) {
    this.pops = scene.ions.map((p, k) => ({ population: k, mz: p.mz, charge: p.charge, total: 0, detected: 0, hit: 0, missed: 0, returned: 0, alive: 0, collisions: 0, aliveKe: 0 }));
  }

  add(r: BatchResult): void {
    for (let k = 0; k < r.count; k++) {
      const p = this.pops[r.population[k]];
      p.total++;
      p.collisions += r.collisions[k];
      const f = r.fate[k];
      if (f === Fate.detected) p.detected++;
      else if (f === Fate.hit) p.hit++;
      else if (f === Fate.missed) p.missed++;
      else if (f === Fate.returned) p.returned++;
      else { p.alive++; p.aliveKe += r.end_ke_ev[k]; }
    }
  }

  species(): SpeciesSummary[] {
    return this.pops.map((p) => ({
      population: p.population, mz: p.mz, charge: p.charge, total: p.total, detected: p.detected, hit: p.hit,
      missed: p.missed, returned: p.returned, alive: p.alive,
      transmission: p.total > 0 ? p.detected / p.total : 0,
      // Mean kinetic energy of the ions still stored at max_time (RF heating shows here at high q).
      alive_mean_ke_ev: p.alive > 0 ? p.aliveKe / p.alive : null,
    }));
  }

  collisions(): number {
    return this.pops.reduce((a, p) => a + p.collisions, 0);
  }
}

/** Arrival times and energies of detected ions per population (TOF figures, trap scan spectra). */
export class ArrivalTally implements BatchReducer {
  readonly arrivals: number[][];
  readonly energies: number[][];
  constructor(scene: Scene) {
    this.arrivals = scene.ions.map(() => []);
    this.energies = scene.ions.map(() => []);
  }

  add(r: BatchResult): void {
    for (let k = 0; k < r.count; k++) {
      if (r.fate[k] !== Fate.detected) continue;
      this.arrivals[r.population[k]].push(r.end_time[k]);
      this.energies[r.population[k]].push(r.end_ke_ev[k]);
    }
  }
}

/** Steps and the largest energy error of the run. */
export class StepTally implements BatchReducer {
  steps = 0;
  energyError = 0;
  add(r: BatchResult): void {
    this.steps += r.steps;
    this.energyError = Math.max(this.energyError, r.energyError);
  }
}

export interface FigureBlocks { cooling?: RunSummary['cooling']; tof?: Record<string, unknown>; scan?: unknown }

/** The figures-of-merit blocks of summary.json that the scene's kind calls for. */
export function figureBlocks(scene: Scene, hist: ReturnType<EnsembleHistory['table']>, tally: SpeciesTally, arrivals: ArrivalTally | null,
  totalIons: number, warnings: string[], species: ReturnType<EnsembleHistory['speciesTable']> = null): FigureBlocks {
  const out: FigureBlocks = {};
  const scan = scanTrap(scene) !== undefined;
  if (scene.gas || scene.stages.some((s) => s.gas)) {
    const fit = fitCooling(hist.t, hist.mean_ke_ev);
    const lastK = hist.t.length - 1;
    out.cooling = {
      tau_s: fit.tau_s,
      final_mean_ke_ev: fit.final_mean_ke_ev,
      final_rms_radius_m: hist.rms_radius_m[lastK],
      final_rms_z_m: hist.rms_z_m[lastK],
      initial_mean_ke_ev: fit.initial_mean_ke_ev,
      plateau_mean_ke_ev: fit.plateau_mean_ke_ev,
      collisions_per_ion: totalIons > 0 ? tally.collisions() / totalIons : 0,
    };
    // The same fit per species, from its own history (history_species.arrow).
    if (species) {
      const K = hist.t.length;
      out.cooling.species = scene.ions.map((p, k) => {
        const t = species.t.subarray(k * K, (k + 1) * K), ke = species.mean_ke_ev.subarray(k * K, (k + 1) * K);
        const f = fitCooling(t, ke);
        return {
          population: k, mz: p.mz, tau_s: f.tau_s, initial_mean_ke_ev: f.initial_mean_ke_ev, final_mean_ke_ev: f.final_mean_ke_ev,
          plateau_mean_ke_ev: f.plateau_mean_ke_ev, final_rms_radius_m: species.rms_radius_m[(k + 1) * K - 1],
        };
      });
    }
    if (fit.tau_s === null && !scan) warnings.push('cooling: mean kinetic energy does not fall over the run; no time constant fitted');
  }
  if (arrivals && isTimeOfFlight(scene)) out.tof = tofSummary(scene, arrivals.arrivals, arrivals.energies);
  if (arrivals && scan) out.scan = scanSummary(scene, arrivals.arrivals);
  return out;
}

/** Whether the run keeps arrival times (TOF or a trap scan). */
export function needsArrivals(scene: Scene): boolean {
  return isTimeOfFlight(scene) || scanTrap(scene) !== undefined;
}
