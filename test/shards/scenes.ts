// Scenes of the shard, merge and cluster tests (test/shards, test/cluster), demo values of the
// fictional Skerry instruments: one writer each, so the files differ only in what they vary.

import { coaxStage } from '../helpers/coax.js';

export interface FilterOptions {
  name: string;
  seed: number;
  /** Ions of the one population. */
  count: number;
  /** Rod length (default 40 mm). */
  length?: string;
  /** A 10 mm drift after the rods (default none). */
  drift?: boolean;
  angleSpread?: boolean;
  maxTime?: string;
  recordEvery?: number;
}

/** The QF-4 filter at 600 V RF, 90 V dc (r0 4 mm, 1.2 MHz), m/z 502 ions at 5 eV. */
export function filterScene(o: FilterOptions): string {
  return `
name: ${o.name}
seed: ${o.seed}
stages:
  - type: quadrupole
    length: ${o.length ?? '40 mm'}
    r0: 4 mm
    rf: { amplitude: 600 V, frequency: 1.2 MHz }
    dc: 90 V
${o.drift ? '  - type: drift\n    length: 10 mm\n' : ''}ions:
  - mz: 502
    count: ${o.count}
    position: { spread: 0.2 mm }
    energy: 5 eV
${o.angleSpread ? '    angle_spread: 1 deg\n' : ''}run: { steps_per_cycle: 20, max_time: ${o.maxTime ?? '20 us'}, record_every: ${o.recordEvery ?? 0} }
`;
}

/**
 * A coaxial capacitor (inner circle of radius 2 mm at 10 V + RF, outer hole of radius 4 mm at
 * 0 V) on a planar grid of 0.25 mm: small enough to solve in well under a second.
 */
export function coaxScene(name: string): string {
  return `name: ${name}
seed: 1
stages:
${coaxStage({ spacing: '0.25 mm', innerDc: '10 V' })}ions:
  - { mz: 100, count: 1, energy: 0.05 eV }
`;
}

/** The key of the coaxial scene's outer radius, as --vary takes it. */
export const COAX_OUTER_KEY = 'stages.0.electrodes.1.holes.0.circle.radius';
