// Scenes of the shard, merge and cluster tests (test/shards, test/cluster), demo values of the
// fictional Skerry instruments: one writer each, so the files differ only in what they vary.

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
  - type: electrodes
    length: 10 mm
    grid: { symmetry: planar, spacing: 0.25 mm, half_width: 5 mm, reference_radius: 1.5 mm, mirror: [x, y] }
    rf: { amplitude: 100 V, frequency: 1 MHz }
    electrodes:
      - name: inner
        potential: { dc: 10 V, rf: 1 }
        shapes:
          - circle: { center: [0 mm, 0 mm], radius: 2 mm }
      - name: outer
        potential: { dc: 0 V }
        shapes:
          - rectangle: { min: [-6 mm, -6 mm], max: [6 mm, 6 mm] }
        holes:
          - circle: { center: [0 mm, 0 mm], radius: 4 mm }
ions:
  - { mz: 100, count: 1, energy: 0.05 eV }
`;
}

/** The key of the coaxial scene's outer radius, as --vary takes it. */
export const COAX_OUTER_KEY = 'stages.0.electrodes.1.holes.0.circle.radius';
