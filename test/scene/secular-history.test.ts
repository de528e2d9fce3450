// The history grid against the fastest secular motion of the ions a trap holds: by default 16
// samples per secular period (the RMS size of a cloud breathes at 2f, Nyquist–Shannon needs more
// than 2 samples per breathing period), and a warning when a scene's grid is coarser than a
// quarter period. Secular frequency βf/2 from the exact Floquet β (Dawson 1976; March & Todd 2005);
// the reference value comes from `iontrail check` of the same operating point.
import { describe, it, expect } from 'vitest';
import { parseScene } from '../../sim/scene/load.js';
import { fastestSecular } from '../../sim/scene/secular.js';
import { sceneWarnings } from '../../sim/engine/checks.js';
import { analyzeOperatingPoint } from '../../sim/mathieu/operating-point.js';

const trap = (history: string) => `
stages: [ { type: trap, r0: 7.07 mm, z0: 5 mm, rf: { amplitude: 400 V, frequency: 1.05 MHz } } ]
ions: [ { mz: 609, count: 1 }, { mz: 100, count: 1 } ]
run: { max_time: 4 ms${history} }
`;

describe('history grid and secular motion', () => {
  it('finds the fastest secular line (m/z 100, axial) and samples it 16 times a period by default', () => {
    const scene = parseScene(trap(''), 't.yaml');
    const sec = fastestSecular(scene.stages, scene.ions)!;
    const ref = analyzeOperatingPoint({ analyzer: 'trap', r0: 7.07e-3, z0: 5e-3, freq: 1.05e6, rf: 400, dc: 0, mz: 100 });
    const fz = ref.axes.find((a) => a.axis === 'z')!.secularFrequencyHz!;
    expect(sec.mz).toBe(100);
    expect(sec.hz).toBeCloseTo(fz, 6);
    expect(scene.run.historyEvery).toBeCloseTo(1 / (16 * fz), 15);
    expect(sceneWarnings(scene).some((w) => /aliases/.test(w))).toBe(false);
  });
  it('warns when the scene asks for a grid coarser than a quarter of that period, with the limit', () => {
    const w = sceneWarnings(parseScene(trap(', history_every: 10 us'), 't.yaml')).find((x) => /aliases/.test(x));
    expect(w).toMatch(/^run\.history_every = 10 µs aliases the cloud-size trace: the secular motion of m\/z 100 in stage 0 runs at 301\.\d kHz .* use at most 0\.83 µs/);
    expect(sceneWarnings(parseScene(trap(', history_every: 0.5 us'), 't.yaml')).some((x) => /aliases/.test(x))).toBe(false);
  });
  it('keeps 200 points over the run where no stage holds ions (a filter passes them through)', () => {
    const scene = parseScene(`
stages: [ { type: quadrupole, length: 150 mm, r0: 4 mm, rf: { amplitude: 832 V, frequency: 1.2 MHz }, dc: 138.3 V } ]
ions: [ { mz: 502, count: 1 } ]
run: { max_time: 300 us }
`, 'q.yaml');
    expect(fastestSecular(scene.stages, scene.ions)).toBeNull();
    expect(scene.run.historyEvery).toBeCloseTo(300e-6 / 200, 15);
  });
});
