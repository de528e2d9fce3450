// The ideal field a real electrode set approximates, where one exists, for the deviation maps:
// round or hyperbolic rods of a quadrupole → the hyperbolic quadrupole of the same r0 and rod
// voltages, Φ = (V₊ + V₋)/2 + (V₊ − V₋)/2 · (x² − y²)/r0² (Dawson, Quadrupole Mass Spectrometry
// and its Applications, Elsevier 1976, ch. 2); a ring and two end caps of hyperboloid shape → the
// ideal quadrupole trap, Φ = V_c + (V_ring − V_c)(r² − 2z² + 2z0²)/(r0² + 2z0²) about the centre
// (March & Todd, Quadrupole Ion Trap Mass Spectrometry, 2nd ed., Wiley 2005, ch. 2).

import type { Electrode, FieldProblem, PlanarShape, Shape } from './problem.js';

export interface IdealField {
  /** What it is, for captions: "ideal quadrupole, r0 4.00 mm". */
  label: string;
  /** Potential at a stage-local point, V (axial: x is r). */
  potential(x: number, y: number, z: number): number;
  /** Inside the region the ideal form describes (between the electrodes' vertices). */
  inRegion(x: number, y: number, z: number): boolean;
}

/** A rod's cross-section (planar shape, or one extruded along z, or a cylinder parallel to z). */
function rodSection(s: Shape): PlanarShape | undefined {
  if (s.kind === 'circle' || s.kind === 'hyperbola') return s;
  if (s.kind === 'extrude') return rodSection(s.shape);
  if (s.kind === 'cylinder' && Math.abs(s.axis[2]) > 0.999999) return { kind: 'circle', center: [s.base[0], s.base[1]], radius: s.radius };
  return undefined;
}

/** Inscribed radius and azimuth of a rod section. */
function rodAt(s: PlanarShape): { r0: number; angle: number } | undefined {
  if (s.kind === 'circle') return { r0: Math.hypot(s.center[0], s.center[1]) - s.radius, angle: Math.atan2(s.center[1], s.center[0]) };
  if (s.kind === 'hyperbola') return { r0: s.vertex, angle: s.angle };
  return undefined;
}

const near = (a: number, b: number, tol: number) => Math.abs(a - b) <= tol;

function quadrupole(es: readonly Electrode[], dc: (e: Electrode) => number): IdealField | undefined {
  const rods = es.map((e) => ({ e, at: e.shapes.map(rodSection).map((s) => (s ? rodAt(s) : undefined)) }))
    .filter((r) => r.e.shapes.length === 2 && r.e.holes.length === 0 && r.at.every((a) => a !== undefined));
  if (rods.length !== 2) return undefined;
  const r0 = rods[0].at[0]!.r0;
  const all = rods.flatMap((r) => r.at.map((a) => a!));
  if (!all.every((a) => near(a.r0, r0, 1e-3 * r0))) return undefined;
  // One pair on the x axis (azimuths 0 and π), the other on the y axis.
  const onX = (r: typeof rods[number]) => r.at.every((a) => near(Math.abs(Math.cos(a!.angle)), 1, 1e-6));
  const onY = (r: typeof rods[number]) => r.at.every((a) => near(Math.abs(Math.sin(a!.angle)), 1, 1e-6));
  const x = rods.find(onX), y = rods.find(onY);
  if (!x || !y || x === y) return undefined;
  const vp = dc(x.e), vm = dc(y.e);
  return {
    label: `ideal quadrupole, r0 ${(r0 * 1e3).toFixed(2)} mm`,
    potential: (px, py) => 0.5 * (vp + vm) + 0.5 * (vp - vm) * (px * px - py * py) / (r0 * r0),
    inRegion: (px, py) => px * px + py * py < r0 * r0,
  };
}

function trap(es: readonly Electrode[], dc: (e: Electrode) => number): IdealField | undefined {
  const ringE = es.find((e) => e.shapes.length === 1 && e.shapes[0].kind === 'hyperboloid' && e.shapes[0].sheet === 'ring');
  const capE = es.find((e) => e.shapes.length === 2 && e.shapes.every((s) => s.kind === 'hyperboloid' && s.sheet === 'cap'));
  if (!ringE || !capE) return undefined;
  const ring = ringE.shapes[0] as Extract<Shape, { kind: 'hyperboloid' }>;
  const caps = capE.shapes as Extract<Shape, { kind: 'hyperboloid' }>[];
  const z0 = caps[0].vertex, zc = ring.center, r0 = ring.vertex;
  if (!caps.every((c) => near(c.vertex, z0, 1e-6 * z0) && near(c.center, zc, 1e-6 * r0))) return undefined;
  const vr = dc(ringE), vc = dc(capE);
  const d = r0 * r0 + 2 * z0 * z0;
  return {
    label: `ideal quadrupole trap, r0 ${(r0 * 1e3).toFixed(2)} mm, z0 ${(z0 * 1e3).toFixed(2)} mm`,
    potential: (r, _y, z) => vc + (vr - vc) * (r * r - 2 * (z - zc) ** 2 + 2 * z0 * z0) / d,
    // Between the sheets and inside the ring's truncation radius: beyond the cut-off the ideal
    // sheets run on to infinity and their deviation (hundreds of volts) says nothing of the trap.
    inRegion: (r, _y, z) => r < ring.truncate && r * r - 2 * (z - zc) ** 2 < r0 * r0 && 2 * (z - zc) ** 2 - r * r < 2 * z0 * z0,
  };
}

/** The ideal field of the problem's electrodes at the given volts per electrode, or undefined. */
export function idealField(problem: FieldProblem, volts: readonly number[]): IdealField | undefined {
  const at = (e: Electrode) => volts[problem.electrodes.indexOf(e)];
  if (problem.grid.symmetry === 'axial') return trap(problem.electrodes, at);
  return quadrupole(problem.electrodes, at);
}
