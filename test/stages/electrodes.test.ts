// Stage kind `electrodes`: the scene keys resolve to the SI shapes of sim/fields/problem.ts
// (units converted by the quantity parser as value × scale: 1 mm = 1e-3 m, 1 deg = π/180 rad, SI definitions), and
// bad input names file:line:key path with the expected unit.

import { describe, expect, it } from 'vitest';
import { parseScene } from '../../sim/scene/load.js';
import { fieldProblemOf, trackingRefusal } from '../../sim/stages/registry.js';

const scene = (grid: string, electrodes: string, extra = '') => `
stages:
  - type: electrodes
    length: 20 mm
    grid: ${grid}
${extra}    electrodes:
${electrodes}
ions:
  - { mz: 100, count: 1 }
`;

const problem = (text: string) => fieldProblemOf(parseScene(text, 's.yaml').stages[0])!;
const err = (text: string) => { try { parseScene(text, 's.yaml'); } catch (e) { return (e as Error).message; } return 'no error'; };

const PLANAR = '{ symmetry: planar, spacing: 0.05 mm, half_width: 20 mm, reference_radius: 3 mm }';
const AXIAL = '{ symmetry: axial, spacing: 0.1 mm, radius: 10 mm, mirror: [z] }';
const SOLID = '{ symmetry: none, spacing: 0.25 mm, half_width: 12 mm, mirror: [x, y] }';

describe('electrodes stage: scene keys to SI shapes', () => {
  it('planar shapes: circle, rectangle, polygon, hyperbola; potential dc + rf × drive', () => {
    const p = problem(scene(PLANAR, `      - name: x-pair
        potential: { dc: 118 V, rf: 1 }
        shapes:
          - circle: { center: [8.52 mm, 0 mm], radius: 4.52 mm }
          - rectangle: { min: [-1 mm, 15 mm], max: [1 mm, 16 mm] }
          - polygon: { points: [[0 mm, -15 mm], [2 mm, -16 mm], [-2 mm, -16 mm]] }
          - hyperbola: { vertex: 4 mm, angle: 90 deg, truncate: 10 mm }`, '    rf: { amplitude: 830 V, frequency: 1.2 MHz }\n'));
    expect(p.grid).toEqual({ symmetry: 'planar', spacing: 5e-5, halfWidth: 0.02, length: 0.02, mirror: [], referenceRadius: 0.003 });
    const e = p.electrodes[0];
    expect(e.potential).toEqual({ dc: 118, rf: 1, aux: 0 });
    expect(e.shapes[0]).toEqual({ kind: 'circle', center: [0.00852, 0], radius: 0.00452 });
    expect(e.shapes[1]).toEqual({ kind: 'rectangle', min: [-0.001, 0.015], max: [0.001, 0.016] });
    expect(e.shapes[2]).toEqual({ kind: 'polygon', points: [[0, -0.015], [0.002, -0.016], [-0.002, -0.016]] });
    expect(e.shapes[3].kind).toBe('hyperbola');
    expect((e.shapes[3] as { angle: number }).angle).toBeCloseTo(Math.PI / 2, 15);
  });

  it('axial shapes: tube, disc with a hole, polygon in (r, z), ring and cap hyperboloids', () => {
    const p = problem(scene(AXIAL, `      - name: lens
        shapes:
          - tube: { inner_radius: 3 mm, outer_radius: 4 mm, from: 0 mm, to: 8 mm }
          - disc: { at: 10 mm, thickness: 1 mm, radius: 8 mm, hole: 1 mm }
          - polygon: { points: [[5 mm, 12 mm], [6 mm, 12 mm], [6 mm, 14 mm]] }
      - name: trap
        potential: { dc: -5 V }
        shapes:
          - hyperboloid: { sheet: ring, vertex: 7 mm, center: 10 mm, truncate: 9 mm }
          - hyperboloid: { sheet: cap, vertex: 5 mm, center: 10 mm, truncate: 9 mm, side: entrance, hole: 0.5 mm }`));
    expect(p.grid.mirror).toEqual(['z']);
    expect(p.electrodes[0].shapes).toEqual([
      { kind: 'tube', innerRadius: 0.003, outerRadius: 0.004, from: 0, to: 0.008 },
      { kind: 'disc', at: 0.01, thickness: 0.001, radius: 0.008, hole: 0.001 },
      { kind: 'polygon', points: [[0.005, 0.012], [0.006, 0.012], [0.006, 0.014]] },
    ]);
    expect(p.electrodes[1].shapes[1]).toEqual({ kind: 'hyperboloid', sheet: 'cap', vertex: 0.005, center: 0.01, truncate: 9 * 1e-3, side: -1, hole: 0.0005 });
    expect(p.electrodes[1].potential).toEqual({ dc: -5, rf: 0, aux: 0 });
  });

  it('a cap of side: both is the pair of caps about its centre; shift moves each out by its value, the shape kept', () => {
    // The pair: the entrance cap (side −1) then the exit cap (+1), each about centre ∓ shift, so
    // the apexes lie at centre ∓ (vertex + shift) (the inside test of problem.ts is about a cap's own centre).
    const p = problem(scene(AXIAL, `      - name: end caps
        shapes:
          - hyperboloid: { sheet: cap, vertex: 5 mm, center: 10 mm, truncate: 9 mm, side: both, shift: 0.5 mm, hole: 0.5 mm }`));
    const caps = p.electrodes[0].shapes as unknown as { center: number; side: number; vertex: number }[];
    expect(caps).toHaveLength(2);
    expect(caps.map((c) => c.side)).toEqual([-1, 1]);
    expect(caps[0].center).toBeCloseTo(0.0095, 15);
    expect(caps[1].center).toBeCloseTo(0.0105, 15);
    expect(caps.map((c) => c.vertex)).toEqual([0.005, 0.005]);
    const one = (shape: string) => err(scene(AXIAL, `      - name: a\n        shapes:\n          - ${shape}`));
    expect(one('hyperboloid: { sheet: ring, vertex: 7 mm, center: 10 mm, truncate: 9 mm, shift: 1 mm }')).toMatch(/^s\.yaml:9: stages\.0\.electrodes\.0\.shapes\.0\.hyperboloid\.shift: moves a cap out from the centre; a ring has none/);
    expect(one('hyperboloid: { sheet: cap, vertex: 5 mm, center: 10 mm, truncate: 9 mm, side: both, shift: 1 }')).toMatch(/hyperboloid\.shift: expects a length such as .* \(no unit\)/);
    expect(one('hyperboloid: { sheet: ring, vertex: 7 mm, center: 10 mm, truncate: 9 mm, side: both }')).toMatch(/hyperboloid\.side: both is for a cap sheet/);
  });

  it('3D shapes: cylinder (axis normalised), box, sphere, extrude, revolve; holes', () => {
    const p = problem(scene(SOLID, `      - name: plate
        shapes:
          - box: { min: [-12 mm, -12 mm, 0 mm], max: [12 mm, 12 mm, 1 mm] }
          - cylinder: { base: [5 mm, 0 mm, 0 mm], axis: [0, 0, 2], radius: 2 mm, from: 2 mm, to: 18 mm }
          - sphere: { center: [0 mm, 0 mm, 10 mm], radius: 1 mm }
          - extrude: { shape: { circle: { center: [0 mm, 8 mm], radius: 1 mm } }, from: 2 mm, to: 18 mm }
          - revolve: { shape: { tube: { inner_radius: 9 mm, outer_radius: 10 mm, from: 2 mm, to: 6 mm } } }
        holes:
          - cylinder: { radius: 3 mm, from: -1 mm, to: 2 mm }`));
    const s = p.electrodes[0].shapes;
    expect(s[1]).toEqual({ kind: 'cylinder', base: [0.005, 0, 0], axis: [0, 0, 1], radius: 0.002, from: 0.002, to: 18 * 1e-3 });
    expect(s[3]).toEqual({ kind: 'extrude', shape: { kind: 'circle', center: [0, 0.008], radius: 0.001 }, from: 0.002, to: 18 * 1e-3 });
    expect(s[4]).toEqual({ kind: 'revolve', shape: { kind: 'tube', innerRadius: 9 * 1e-3, outerRadius: 0.01, from: 0.002, to: 0.006 }, center: [0, 0] });
    expect(p.electrodes[0].holes[0]).toEqual({ kind: 'cylinder', base: [0, 0, 0], axis: [0, 0, 1], radius: 0.003, from: -0.001, to: 0.002 });
  });

  it('bad input: file:line: key path and what is expected', () => {
    const one = (shape: string, grid = PLANAR) => err(scene(grid, `      - name: a\n        shapes:\n          - ${shape}`));
    expect(one('circle: { center: [8 mm, 0 mm], radius: 4 }')).toMatch(/^s\.yaml:9: stages\.0\.electrodes\.0\.shapes\.0\.circle\.radius: expects a length such as .* \(no unit\)/);
    expect(one('circle: { center: [8 mm], radius: 4 mm }')).toMatch(/^s\.yaml:9: stages\.0\.electrodes\.0\.shapes\.0\.circle\.center: needs at least 2 entries/);
    expect(one('cirle: { radius: 4 mm }')).toMatch(/^s\.yaml:9: stages\.0\.electrodes\.0\.shapes\.0\.cirle: expects one of circle, .*did you mean 'circle'/);
    expect(one('tube: { inner_radius: 1 mm, outer_radius: 2 mm, from: 0 mm, to: 5 mm }')).toMatch(/shapes\.0\.tube: is not a shape of a planar grid; expected circle, rectangle, polygon or hyperbola/);
    expect(one('tube: { inner_radius: 3 mm, outer_radius: 2 mm, from: 0 mm, to: 5 mm }', AXIAL)).toMatch(/^s\.yaml:9: stages\.0\.electrodes\.0\.shapes\.0\.tube\.outer_radius: must exceed inner_radius/);
    expect(err(scene('{ symmetry: axial, spacing: 0.1 mm }', '      - { name: a, shapes: [ { disc: { at: 1 mm, thickness: 1 mm, radius: 2 mm } } ] }'))).toMatch(/^s\.yaml:\d+: stages\.0\.grid\.radius: is required for symmetry axial/);
    expect(err(scene('{ symmetry: planar, spacing: 0.05 mm, half_width: 20 mm }', '      - { name: a, shapes: [ { circle: { center: [8 mm, 0 mm], radius: 1 mm } } ] }'))).toMatch(/grid\.reference_radius: is required for symmetry planar/);
    expect(err(scene(PLANAR, '      - { name: a, potential: { rf: 1 }, shapes: [ { circle: { center: [8 mm, 0 mm], radius: 1 mm } } ] }'))).toMatch(/electrodes\.0\.potential\.rf: drives this electrode with the stage RF, but the stage has no rf block/);
    expect(err(scene(PLANAR, '      - { name: a, shapes: [ { circle: { center: [8 mm, 0 mm], radius: 1 mm } } ] }\n      - { name: a, shapes: [ { circle: { center: [-8 mm, 0 mm], radius: 1 mm } } ] }'))).toMatch(/^s\.yaml:8: stages\.0\.electrodes\.1\.name: 'a' names two electrodes/);
  });

  it('ions can be tracked through it: no kind refuses tracking any more', () => {
    const s = parseScene(scene(PLANAR, '      - { name: a, shapes: [ { circle: { center: [8 mm, 0 mm], radius: 1 mm } } ] }'), 's.yaml');
    expect(trackingRefusal(s.stages)).toBeUndefined();
    const q = parseScene('stages:\n  - { type: quadrupole, length: 150 mm, r0: 4 mm, rf: { amplitude: 832 V, frequency: 1.2 MHz } }\nions:\n  - { mz: 502, count: 1 }\n', 'q.yaml');
    expect(trackingRefusal(q.stages)).toBeUndefined();
  });
});
