// What the 3D view says about electrodes and colours: each stage kind's labels carry the voltages
// of the scene as resolved (the electrode conventions of DESIGN.md), the colour map is ordered,
// kinetic energy is ½mv², and fates the palette does not know are drawn grey instead of failing.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { STAGE_KINDS, kindNamed } from '../../sim/stages/registry.js';
import { FATE_NAMES } from '../../sim/core/batch.js';
import { electrodeLabelPoints } from '../../render/scene3d/electrodeLabels.js';
import { FATE_UNKNOWN, valueRamp } from '../../render/scene3d/palette.js';
import { readRunView, placeStages } from '../../render/scene3d/runInput.js';
import { trajectoryColors } from '../../render/scene3d/trajectoryColors.js';
import { makeRunFolder } from './fixtures.js';

const labels = (stage: Record<string, unknown>) => kindNamed(stage.type)!.electrodeLabels(stage).map((l) => l.text);

describe('electrode labels from the stage kinds', () => {
  it('quadrupole: x rods at +(U + V cos Ωt), y rods at −(U + V cos Ωt) (DESIGN.md rod convention)', () => {
    // Skerry QF-4 working point as a run folder stores it (SI, V zero-to-peak).
    const st = { type: 'quadrupole', length: 0.15, r0: 0.004, rf: { amplitude: 832, frequency: 1.2e6, phase: 0 }, dc: 138.3, zStart: 0, zEnd: 0.15 };
    expect(labels(st)).toEqual(['rods x +(138 V + 832 V RF)', 'rods y −(138 V + 832 V RF)']);
    expect(labels({ ...st, dc: 0 })).toEqual(['rods x +832 V RF', 'rods y −832 V RF']);
  });

  it('trap: ring at U + V cos Ωt, end caps grounded, supplementary AC between the caps (DESIGN.md trap convention)', () => {
    const st = { type: 'trap', r0: 0.00707, z0: 0.005, length: 0.01, rf: { amplitude: 400, frequency: 1e6, phase: 0 }, dc: 0, aperture: 0.001, zStart: 0, zEnd: 0.01 };
    expect(labels(st)).toEqual(['ring 400 V RF', 'end caps 0 V']);
    expect(labels({ ...st, dc: -20, aux: { amplitude: 3.2, frequency: 3e5, phase: 0 } })).toEqual(['ring −20 V + 400 V RF', 'end caps 0 V + 3.2 V AC cap to cap']);
  });

  it('field regions: the drop across each (a reflectron stores its retarding voltage negative)', () => {
    expect(labels({ type: 'accelerate', role: 'reflectron', closed: true, length: 0.5, voltage: -3300, zStart: 0, zEnd: 0.5 })).toEqual(['reflectron 3.3 kV']);
    expect(labels({ type: 'accelerate', role: 'source-extraction', length: 0.002, voltage: 300, zStart: 0, zEnd: 0.002 })).toEqual(['extraction 300 V']);
    expect(labels({ type: 'accelerate', role: 'gap', length: 0.01, voltage: 20000, zStart: 0, zEnd: 0.01 })).toEqual(['acceleration gap 20 kV']);
    expect(labels({ type: 'drift', length: 0.8, aperture: null, zStart: 0, zEnd: 0.8 })).toEqual(['drift tube, field-free']);
  });

  it('every registered kind labels its electrodes with at least one anchor each', () => {
    const stored: Record<string, Record<string, unknown>> = {
      quadrupole: { type: 'quadrupole', length: 0.1, r0: 0.004, rf: { amplitude: 500 }, dc: 10 },
      trap: { type: 'trap', r0: 0.01, z0: 0.007, length: 0.014, rf: { amplitude: 500 }, dc: 0, aperture: 0.001 },
      accelerate: { type: 'accelerate', role: 'gap', length: 0.01, voltage: 2000, aperture: 0.006 },
      drift: { type: 'drift', length: 0.3, aperture: 0.012 },
      'linear-trap': { type: 'linear-trap', length: 0.06, r0: 0.004, z0: 0.03, rf: { amplitude: 300 }, dc: 0, endDc: 12, kappa: 0.05, aux: { amplitude: 2, frequency: 3e5 } },
      multipole: { type: 'multipole', poles: 8, length: 0.12, r0: 0.003, rf: { amplitude: 150 }, dc: 0 },
      electrodes: {
        type: 'electrodes', length: 0.02, rf: { amplitude: 500 },
        problem: { grid: { symmetry: 'axial', spacing: 1e-4 }, electrodes: [{ name: 'tube', potential: { dc: 5, rf: 1, aux: 0 }, shapes: [{ kind: 'tube', innerRadius: 0.005, outerRadius: 0.006, from: 0, to: 0.02 }], holes: [] }] },
      },
    };
    for (const k of STAGE_KINDS) {
      const got = k.electrodeLabels(stored[k.type]);
      expect(got.length, k.type).toBeGreaterThan(0);
      for (const l of got) expect(l.at.length, l.text).toBeGreaterThan(0);
    }
  });

  it('electrodes stage: each electrode by its name with dc + rf × the stage RF, anchored on its shape', () => {
    const st = {
      type: 'electrodes', length: 0.02, rf: { amplitude: 500 }, zStart: 0, zEnd: 0.02,
      problem: { grid: { symmetry: 'axial', spacing: 1e-4 }, electrodes: [
        { name: 'tube', potential: { dc: 5, rf: 1, aux: 0 }, shapes: [{ kind: 'tube', innerRadius: 0.005, outerRadius: 0.006, from: 0, to: 0.02 }], holes: [] },
        { name: 'plate', potential: { dc: -20, rf: 0, aux: 0 }, shapes: [{ kind: 'disc', at: 0.001, thickness: 0.001, radius: 0.01, hole: 0.002 }], holes: [] },
      ] },
    };
    expect(labels(st)).toEqual(['tube 5 V + 500 V RF', 'plate −20 V']);
  });

  it('anchors of a round electrode avoid the wedge cut toward the viewer (±45° about it)', () => {
    const stages = placeStages([{ type: 'trap', r0: 0.01, z0: 0.007, length: 0.014, rf: { amplitude: 500 }, dc: 0, aperture: 0.001 }], 'test');
    const ring = electrodeLabelPoints(stages, 0).find((l) => l.text.startsWith('ring'))!;
    expect(ring.points.length).toBeGreaterThan(0);
    for (const p of ring.points) expect(Math.abs(Math.atan2(p.y, p.x))).toBeGreaterThan(Math.PI / 4);
    // Anchors lie in the ring body: 1.4·r0 from the axis on the trap's mid-plane.
    for (const p of ring.points) { expect(Math.hypot(p.x, p.y)).toBeCloseTo(14, 6); expect(p.z).toBeCloseTo(7, 6); }
  });
});

let tmp: string;
beforeAll(() => { tmp = mkdtempSync(join(tmpdir(), 'iontrail-labels-')); });
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

describe('trajectory colours', () => {
  it('the value map rises monotonically in lightness (viridis, van der Walt & Smith 2015: CAM02-UCS J′ increasing)', () => {
    // Relative luminance (ITU-R BT.709 weights on linearised sRGB, IEC 61966-2-1) as a proxy for lightness.
    const lin = (c: number) => (c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4);
    let last = -1;
    for (let i = 0; i <= 32; i++) {
      const [r, g, b] = valueRamp(i / 32) as number[];
      const Y = 0.2126 * lin(r) + 0.7152 * lin(g) + 0.0722 * lin(b);
      expect(Y).toBeGreaterThan(last);
      last = Y;
    }
  });

  it('time of flight: each trajectory starts at the dark end and colours change along it', async () => {
    const run = await readRunView(await makeRunFolder(join(tmp, 'f'), { kind: 'filter', ions: 6, points: 50 }));
    const { rgb, legend } = trajectoryColors(run, 'time');
    expect(legend).toMatchObject({ kind: 'ramp', title: 'time of flight', unit: 'µs', min: 0 });
    // Fixture: a detected ion's last point is at 60 µs, the latest time of the run.
    if (legend.kind === 'ramp') expect(legend.max).toBeCloseTo(60, 6);
    const first = run.traj.start[0];
    expect([...rgb.subarray(3 * first, 3 * first + 3)]).toEqual([...valueRamp(0, new Float32Array(3))]);
    const k = run.traj.ionRow.findIndex((row) => run.fate[row] === 'detected');
    const a = run.traj.start[k], b = run.traj.start[k + 1];
    expect(new Set(Array.from({ length: b - a }, (_, i) => rgb[3 * (a + i) + 1])).size).toBeGreaterThan(10);
  });

  it('kinetic energy is ½mv² with m = (m/z)·z·u: ions after a 2 kV gap carry 2000 eV (energy conservation, qU)', async () => {
    const run = await readRunView(await makeRunFolder(join(tmp, 't'), { kind: 'tof', ions: 7, points: 20 }), { velocities: true });
    const { legend } = trajectoryColors(run, 'energy');
    expect(legend.kind).toBe('ramp');
    // The fixture derives its speeds with e = 1.602e-19 C and u = 1.6605e-27 kg (four figures), so
    // ½mv² with CODATA values differs by their relative rounding, about 1.3e-4: allow 5e-4.
    if (legend.kind === 'ramp') { expect(legend.unit).toBe('eV'); expect(Math.abs(legend.min / 2000 - 1)).toBeLessThan(5e-4); }
  });

  it('a fate the palette does not know is drawn grey and listed after the engine’s fates', async () => {
    const run = await readRunView(await makeRunFolder(join(tmp, 'u'), { kind: 'filter', ions: 6, points: 20 }));
    run.fate[0] = 'escaped-sideways';
    const { rgb, legend } = trajectoryColors(run, 'fate');
    expect([...rgb.subarray(0, 3)]).toEqual([...Float32Array.from(FATE_UNKNOWN)]);
    expect(legend.kind).toBe('swatches');
    if (legend.kind === 'swatches') {
      const names = legend.entries.map((e) => e.label);
      expect(names[names.length - 1]).toBe('escaped-sideways');
      expect(names.slice(0, -1).every((n) => (FATE_NAMES as readonly string[]).includes(n))).toBe(true);
    }
  });
});
