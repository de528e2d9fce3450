// The stage registry as the loader and the renderer use it: every scene-file entry resolves to
// stages of its kind, lengths chain along z, and the renderer's placed stages know every kind.
// (Scene-file conventions: DESIGN.md; lengths by construction, no outside source needed.)
import { describe, it, expect } from 'vitest';
import { parseScene } from '../../sim/scene/load.js';
import { kindNamed, kindOf, STAGE_ENTRIES, STAGE_KINDS, STAGE_TYPES } from '../../sim/stages/registry.js';
import { placeStages } from '../../render/scene3d/runInput.js';
import { sceneForJson } from '../../sim/runs/run-scene.js';

const yaml = `
stages:
  - { type: source, extraction: { length: 5 mm, voltage: 300 V }, acceleration: { length: 10 mm, voltage: 2.7 kV } }
  - { type: accelerate, length: 2 mm, voltage: 0 V }
  - { type: quadrupole, length: 100 mm, r0: 4 mm, rf: { amplitude: 500 V, frequency: 1 MHz } }
  - { type: trap, r0: 7.07 mm, rf: { amplitude: 300 V, frequency: 1 MHz } }
  - { type: drift, length: 300 mm }
  - { type: reflectron, length: 100 mm, voltage: 3.3 kV }
ions: [ { mz: 500, count: 1 } ]
`;

describe('stage registry', () => {
  const scene = parseScene(yaml, 'registry.yaml');
  it('has one kind per resolved type and a kind for every scene-file entry', () => {
    expect(new Set(STAGE_TYPES).size).toBe(STAGE_KINDS.length);
    for (const t of STAGE_TYPES) expect(kindNamed(t)?.type).toBe(t);
    expect([...STAGE_ENTRIES.keys()].sort()).toEqual(['accelerate', 'drift', 'electrodes', 'linear-trap', 'multipole', 'quadrupole', 'reflectron', 'source', 'trap']);
    expect(kindNamed('hexapole')).toBeUndefined();
  });
  it('resolves every entry through its kind, chaining the stages along z', () => {
    expect(scene.stages.map((s) => s.type)).toEqual(['accelerate', 'accelerate', 'accelerate', 'quadrupole', 'trap', 'drift', 'accelerate']);
    for (let i = 1; i < scene.stages.length; i++) expect(scene.stages[i].zStart).toBe(scene.stages[i - 1].zEnd);
    expect(scene.stages.map((s) => s.sceneIndex)).toEqual([0, 0, 1, 2, 3, 4, 5]);
    // A trap without a length spans its end caps, 2·z0 with z0 = r0/√2 by default.
    expect(scene.stages[4].length).toBeCloseTo((2 * 7.07e-3) / Math.SQRT2, 15);
    // The reflectron's retarding field: the potential rises towards the back plate.
    expect(kindOf(scene.stages[6]).field(scene.stages[6]).drop).toBeCloseTo(3300, 9);
  });
  it('gives the renderer a description and an outline of every stage read back from a run folder', () => {
    const placed = placeStages((sceneForJson(scene) as { stages: unknown }).stages, 'summary.json');
    expect(placed.length).toBe(scene.stages.length);
    for (const p of placed) {
      const k = kindNamed(p.type)!;
      expect(k.describe(p as unknown as Record<string, unknown>).length).toBeGreaterThan(0);
      expect(k.outline(p as unknown as Record<string, unknown>).length).toBeGreaterThan(0);
    }
    expect(() => placeStages([{ type: 'hexapole', length: 1 }], 'summary.json')).toThrow(/'hexapole' is not quadrupole\|trap\|multipole\|linear-trap\|accelerate\|drift/);
  });
  it('names the unknown entry and the known ones in a one-line error', () => {
    expect(() => parseScene('stages: [ { type: quadrupol, length: 1 mm } ]\nions: [ { mz: 1, count: 1 } ]\n', 's.yaml'))
      .toThrow(/^s\.yaml:1: stages\.0\.type: expects one of quadrupole, trap, multipole, linear-trap, reflectron, source, accelerate, drift, electrodes, got 'quadrupol' \(did you mean 'quadrupole'\?\)$/);
  });
});
