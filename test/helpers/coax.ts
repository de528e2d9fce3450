// The coaxial capacitor the field checks solve (inner circle of radius 2 mm at innerDc + RF, outer
// hole of radius 4 mm at 0 V, planar grid mirrored in x and y), as one YAML stage-list entry; its
// closed form is φ(r) = V ln(b/r)/ln(b/a) (Jackson, Classical Electrodynamics, 3rd ed., §1.13).

export function coaxStage(o: { spacing: string; innerDc: string }): string {
  return `  - type: electrodes
    length: 10 mm
    grid: { symmetry: planar, spacing: ${o.spacing}, half_width: 5 mm, reference_radius: 1.5 mm, mirror: [x, y] }
    rf: { amplitude: 100 V, frequency: 1 MHz }
    electrodes:
      - name: inner
        potential: { dc: ${o.innerDc}, rf: 1 }
        shapes:
          - circle: { center: [0 mm, 0 mm], radius: 2 mm }
      - name: outer
        potential: { dc: 0 V }
        shapes:
          - rectangle: { min: [-6 mm, -6 mm], max: [6 mm, 6 mm] }
        holes:
          - circle: { center: [0 mm, 0 mm], radius: 4 mm }
`;
}
