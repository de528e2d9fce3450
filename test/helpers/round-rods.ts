// The Skerry QF-4R cross-section (round rods of 4.52 mm radius at r0 = 4 mm, R/r0 = 1.13) as a
// planar electrodes stage, YAML for a scene's stage list: shared by the solved-field checks and
// benchmarks that track ions through a round-rod set.

export interface RodSetOptions {
  length: string;
  spacing: string;
  dc: string;
  rf: string;
  path?: 'multipole' | 'grid';
}

export function roundRodStage(o: RodSetOptions): string {
  const neg = o.dc.startsWith('-') ? o.dc.slice(1) : `-${o.dc}`;
  return `  - type: electrodes
    length: ${o.length}
    field_path: ${o.path ?? 'multipole'}
    grid: { symmetry: planar, spacing: ${o.spacing}, half_width: 14 mm, reference_radius: 2 mm, mirror: [x, y] }
    rf: ${o.rf}
    electrodes:
      - name: rods x
        potential: { dc: ${o.dc}, rf: 1 }
        shapes: [ { circle: { center: [8.52 mm, 0 mm], radius: 4.52 mm } }, { circle: { center: [-8.52 mm, 0 mm], radius: 4.52 mm } } ]
      - name: rods y
        potential: { dc: ${neg}, rf: -1 }
        shapes: [ { circle: { center: [0 mm, 8.52 mm], radius: 4.52 mm } }, { circle: { center: [0 mm, -8.52 mm], radius: 4.52 mm } } ]
`;
}
