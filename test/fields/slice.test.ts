// Slices of a mirrored 3D grid, as the field figures draw them. A round-rod quadrupole is symmetric
// under x → −x and y → −y, so the grid cut at both mirror planes, unfolded, must give the same
// plane as the full grid solved without mirrors (symmetry of the Dirichlet problem; the two
// discrete problems are the same equations, so they differ only by the solver's tolerance). The
// electrodes must sit where the rods are (circles of the given centre and radius, closed form), and
// the painted map must leave blank what has no value: the bug this file was written for painted
// every cell without a deviation value in the colour of the electrode painted before it, so rod
// pairs came out as bands across the whole plane.
import { describe, expect, it } from 'vitest';
import { createCanvas } from '@napi-rs/canvas';
import { solveField, type FieldProblem, type Shape } from '../../sim/fields/index.js';
import { fieldMap } from '../../sim/fields/slice.js';
import { idealField } from '../../sim/fields/ideal.js';
import { deviationSpec, electrodeAt } from '../../render/fields/figures.js';
import { hexRgb, seriesColor } from '../../render/common/palette.js';
import type { PanelGeom } from '../../render/plot/figure.js';

const r0 = 2e-3, R = 1.13 * r0, c = r0 + R, L = 6e-3, hw = 7e-3, h = 0.25e-3;
const rod = (x: number, y: number): Shape => ({ kind: 'cylinder', base: [x, y, 0], axis: [0, 0, 1], radius: R, from: 0, to: L });

function quadrupole(mirror: ('x' | 'y')[]): FieldProblem {
  return {
    grid: { symmetry: 'none', spacing: h, halfWidth: hw, length: L, mirror },
    electrodes: [
      { name: 'x pair', potential: { dc: 1, rf: 0, aux: 0 }, shapes: [rod(c, 0), rod(-c, 0)], holes: [] },
      { name: 'y pair', potential: { dc: -1, rf: 0, aux: 0 }, shapes: [rod(0, c), rod(0, -c)], holes: [] },
    ],
  };
}

describe('slice of a 3D grid mirrored at x and y', async () => {
  const halfP = quadrupole(['x', 'y']), fullP = quadrupole([]);
  const [half, full] = [await solveField(halfP, { workers: 1 }), await solveField(fullP, { workers: 1 })];
  const volts = [1, -1];
  const mh = fieldMap(half, volts, 2, L / 2, halfP), mf = fieldMap(full, volts, 2, L / 2, fullP);

  it('unfolds to the plane of the full grid: same nodes, same labels, same potential', () => {
    expect(mh.plane).toBe(mf.plane);
    // Node coordinates from different origins (0 and −hw) agree to rounding (1e-12 m ≪ h).
    for (const [p, q] of [[mh.u.coords, mf.u.coords], [mh.v.coords, mf.v.coords]]) {
      expect(p.length).toBe(q.length);
      expect(Math.max(...p.map((x, i) => Math.abs(x - q[i])))).toBeLessThan(1e-12);
    }
    expect(Array.from(mh.inside)).toEqual(Array.from(mf.inside));
    // Both solved to a relative residual of 1e-10 with potentials of order 1 V: 1e-7 V is three
    // decades above what the solver leaves and far below any grid or geometry error.
    let d = 0;
    for (let i = 0; i < mh.values.length; i++) d = Math.max(d, Math.abs(mh.values[i] - mf.values[i]));
    expect(d).toBeLessThan(1e-7);
  });

  it('puts the electrodes where the rods are, on every side of the mirror planes', () => {
    const nu = mh.u.coords.length;
    let wrong = 0, rodsSeen = 0;
    for (let b = 0; b < mh.v.coords.length; b++) for (let a = 0; a < nu; a++) {
      const x = mh.u.coords[a], y = mh.v.coords[b];
      // Closed form: inside a circle of radius R about (±c, 0) or (0, ±c); nodes within 1e-9 m of
      // a surface are left out (either label is right there).
      const dx = Math.min(Math.hypot(x - c, y), Math.hypot(x + c, y)) - R, dy = Math.min(Math.hypot(x, y - c), Math.hypot(x, y + c)) - R;
      if (Math.abs(dx) < 1e-9 || Math.abs(dy) < 1e-9) continue;
      const want = dx < 0 ? 0 : dy < 0 ? 1 : -1;
      if (want >= 0) rodsSeen++;
      if (mh.inside[a + nu * b] !== want) wrong++;
      if (electrodeAt(mh, x + 0.3 * h, y + 0.2 * h) !== (Math.min(Math.hypot(x + 0.3 * h - c, y + 0.2 * h), Math.hypot(x + 0.3 * h + c, y + 0.2 * h)) < R ? 0
        : Math.min(Math.hypot(x + 0.3 * h, y + 0.2 * h - c), Math.hypot(x + 0.3 * h, y + 0.2 * h + c)) < R ? 1 : -1)) wrong++;
    }
    expect(rodsSeen).toBeGreaterThan(1000);
    expect(wrong).toBe(0);
  });

  it('paints no colour where the deviation has no value, and each rod in its own colour', () => {
    const ideal = idealField(halfP, volts)!;
    expect(ideal).toBeDefined();
    const nu = mh.u.coords.length;
    const dev = new Float64Array(mh.values.length);
    for (let i = 0; i < dev.length; i++) {
      const x = mh.u.coords[i % nu], y = mh.v.coords[Math.floor(i / nu)];
      dev[i] = mh.inside[i] < 0 && ideal.inRegion(x, y, 0) ? mh.values[i] - ideal.potential(x, y, 0) : NaN;
    }
    const spec = deviationSpec(mh, dev, 0.01, ideal.label, { title: '', subtitle: '', footer: '', electrodes: ['x pair', 'y pair'] });
    const W = 420, canvas = createCanvas(W, W), ctx = canvas.getContext('2d');
    ctx.fillStyle = '#ffffff';
    ctx.fillRect(0, 0, W, W);
    // The panel spans ±hw on both axes over the whole canvas: px = ax + bx·x, py = ay + by·y.
    const bx = W / (2 * hw), ax = hw * bx, by = -W / (2 * hw), ay = W + hw * by;
    const g = { left: 0, top: 0, width: W, height: W, ax, bx, ay, by, px: (v: number) => ax + bx * v, py: (v: number) => ay + by * v } as unknown as PanelGeom;
    spec.panels[0].draw(ctx as never, g);
    const img = ctx.getImageData(0, 0, W, W).data;
    const rgbAt = (x: number, y: number) => { const i = 4 * (Math.floor(g.py(y)) * W + Math.floor(g.px(x))); return [img[i], img[i + 1], img[i + 2]]; };
    // Off the rods and outside r0 (no ideal field there): the white canvas shows through.
    for (const [x, y] of [[5.5e-3, 5.5e-3], [-5.5e-3, 5.5e-3], [-5.5e-3, -5.5e-3], [6.5e-3, 0], [0, -6.6e-3], [2.5e-3, 2.5e-3]]) expect(rgbAt(x, y)).toEqual([255, 255, 255]);
    for (const [x, y, k] of [[c, 0, 0], [-c, 0, 0], [0, c, 1], [0, -c, 1]] as const) expect(rgbAt(x, y)).toEqual(hexRgb(seriesColor(k)));
  });
});
