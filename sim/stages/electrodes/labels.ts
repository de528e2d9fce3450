// Where an electrode's label points in the 3D view: a point on its first shape, as a distance from
// the axis and a z along the stage (sim/stages/outline.ts LabelAnchor).

import type { LabelAnchor } from '../outline.js';

type Raw = Readonly<Record<string, unknown>>;
const n = (v: unknown, d = 0) => (typeof v === 'number' && Number.isFinite(v) ? v : d);
const v = (p: unknown, i: number) => (Array.isArray(p) ? n(p[i]) : 0);

/** A point on the shape (stored SI form, problem.ts): planar shapes sit at mid-length. */
export function labelAnchor(sym: string, s: Raw, length: number): LabelAnchor {
  const mid = length / 2;
  switch (s.kind) {
    case 'circle': return { r: Math.max(0, Math.hypot(v(s.center, 0), v(s.center, 1)) - n(s.radius)), z: mid, azimuths: [Math.atan2(v(s.center, 1), v(s.center, 0))] };
    case 'hyperbola': return { r: n(s.vertex), z: mid, azimuths: [n(s.angle)] };
    case 'rectangle': case 'box': return { r: Math.hypot(0.5 * (v(s.min, 0) + v(s.max, 0)), 0.5 * (v(s.min, 1) + v(s.max, 1))), z: s.kind === 'box' ? 0.5 * (v(s.min, 2) + v(s.max, 2)) : mid };
    case 'tube': return { r: n(s.innerRadius), z: 0.5 * (n(s.from) + n(s.to)) };
    case 'disc': return { r: Math.max(n(s.hole), 0.5 * n(s.radius)), z: n(s.at) };
    case 'hyperboloid': return s.sheet === 'ring' ? { r: n(s.vertex), z: n(s.center) } : { r: n(s.hole), z: n(s.center) + n(s.side, 1) * n(s.vertex) };
    case 'sphere': return { r: Math.hypot(v(s.center, 0), v(s.center, 1)), z: v(s.center, 2) };
    case 'cylinder': return { r: Math.hypot(v(s.base, 0), v(s.base, 1)), z: v(s.base, 2) + 0.5 * (n(s.from) + n(s.to)) * v(s.axis, 2) };
    case 'extrude': return { ...labelAnchor('planar', (s.shape ?? {}) as Raw, length), z: 0.5 * (n(s.from) + n(s.to)) };
    case 'revolve': return labelAnchor('axial', (s.shape ?? {}) as Raw, length);
    case 'polygon': {
      const p0 = Array.isArray(s.points) ? (s.points[0] as unknown) : undefined;
      return sym === 'axial' ? { r: v(p0, 0), z: v(p0, 1) } : { r: Math.hypot(v(p0, 0), v(p0, 1)), z: mid, azimuths: [Math.atan2(v(p0, 1), v(p0, 0))] };
    }
  }
  return { r: 0, z: mid };
}
