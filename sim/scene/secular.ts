// The fastest secular motion of a scene: the highest fundamental secular frequency βf/2 over its
// stages that hold ions (traps), species and axes (Floquet β, sim/mathieu; ω = βΩ/2, Dawson 1976 and March & Todd
// 2005), at the largest RF amplitude the stage reaches (the end of a ramp). An axis past the edge
// of stability is taken at the β = 1 edge, f/2, where an ion last oscillates before it is lost.
// The ensemble history samples the cloud size on a grid; the RMS size of a cloud that is not yet
// thermalised breathes at twice the secular frequency, so a grid coarser than a quarter of the
// secular period aliases it (the Nyquist–Shannon limit for 2f).

import type { Stage, Population } from './types.js';
import { kindOf, rfOf } from '../stages/registry.js';
import { mathieuParameters } from '../mathieu/parameters.js';
import { floquet } from '../mathieu/floquet.js';

export interface FastestSecular {
  hz: number;
  mz: number;
  stage: number;
}

export function fastestSecular(stages: readonly Stage[], ions: readonly Population[]): FastestSecular | null {
  let best: FastestSecular | null = null;
  stages.forEach((st, index) => {
    const kind = kindOf(st);
    if (!kind.holdsIons) return;
    const g = kind.operatingPoint?.(st);
    const drive = rfOf(st);
    if (g === undefined || drive === undefined) return;
    const rf = Math.max(drive.amplitude, drive.ramp?.to ?? 0);
    if (!(rf > 0)) return;
    for (const p of ions) {
      for (const axis of mathieuParameters({ ...g, rf, mz: p.mz, charge: p.charge })) {
        const beta = floquet(axis.a, axis.q).beta;
        const hz = (Math.min(beta ?? 1, 1) * drive.frequency) / 2;
        if (best === null || hz > best.hz) best = { hz, mz: p.mz, stage: index };
      }
    }
  });
  return best;
}

/** Ensemble-history steps per secular period by default: 16, so the breathing at 2f gets 8. */
export const HISTORY_STEPS_PER_SECULAR = 16;
