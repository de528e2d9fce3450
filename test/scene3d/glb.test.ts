// glTF 2.0 binary structure, checked against the Khronos glTF 2.0 specification (§4.4 GLB file
// format: 12-byte header, JSON chunk then BIN chunk, 4-byte alignment; §3.6 accessors).
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parseGlb, renderGlb } from '../../render/scene3d/glb.js';
import { readRunView, type RunView } from '../../render/scene3d/runInput.js';
import { makeRunFolder } from './fixtures.js';

let tmp: string;
let run: RunView;
let bytes: Uint8Array;

beforeAll(async () => {
  tmp = mkdtempSync(join(tmpdir(), 'iontrail-glb-'));
  run = await readRunView(await makeRunFolder(join(tmp, 'filter'), { kind: 'filter', ions: 25, points: 120 }));
  bytes = await renderGlb(run, { camera: 'iso', color: 'mz', rods: 'hyperbolic' });
});
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

const COMPONENTS: Record<string, number> = { SCALAR: 1, VEC2: 2, VEC3: 3, VEC4: 4, MAT4: 16 };
const BYTES: Record<number, number> = { 5120: 1, 5121: 1, 5122: 2, 5123: 2, 5125: 4, 5126: 4 };

describe('.glb', () => {
  it('has the 12-byte header: magic glTF, version 2, total length = file length', () => {
    const dv = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
    expect(new TextDecoder().decode(bytes.subarray(0, 4))).toBe('glTF');
    expect(dv.getUint32(4, true)).toBe(2);
    expect(dv.getUint32(8, true)).toBe(bytes.byteLength);
    expect(bytes.byteLength % 4).toBe(0);
  });

  it('has a JSON chunk then a BIN chunk whose length matches buffers[0].byteLength', () => {
    const { json, bin } = parseGlb(bytes);
    expect(json.asset.version).toBe('2.0');
    expect(json.buffers).toHaveLength(1);
    // BIN is padded to 4 bytes; the buffer's declared length fits in it with less than 4 spare.
    expect(bin.byteLength - json.buffers[0].byteLength).toBeGreaterThanOrEqual(0);
    expect(bin.byteLength - json.buffers[0].byteLength).toBeLessThan(4);
    for (const bv of json.bufferViews) expect(bv.byteOffset + bv.byteLength).toBeLessThanOrEqual(bin.byteLength);
    for (const acc of json.accessors) {
      const bv = json.bufferViews[acc.bufferView];
      expect((acc.byteOffset ?? 0) + acc.count * COMPONENTS[acc.type] * BYTES[acc.componentType]).toBeLessThanOrEqual(bv.byteLength);
    }
  });

  it('has one LINE_STRIP per ion whose POSITION and COLOR_0 counts equal that ion’s points', () => {
    const { json } = parseGlb(bytes);
    const byName = new Map<string, any>(json.nodes.map((n: any) => [n.name, n]));
    const { start, ionRow } = run.traj;
    let checked = 0;
    for (let k = 0; k + 1 < start.length; k++) {
      const node = byName.get(`ion ${run.ionId[ionRow[k]]}`);
      expect(node).toBeDefined();
      const prim = json.meshes[node.mesh].primitives[0];
      expect(prim.mode).toBe(3); // LINE_STRIP (glTF 2.0 §3.7.2.1)
      expect(node.extras).toEqual({ ion: run.ionId[ionRow[k]], mz: run.mz[ionRow[k]], fate: run.fate[ionRow[k]] });
      expect(json.accessors[prim.attributes.POSITION].count).toBe(start[k + 1] - start[k]);
      expect(json.accessors[prim.attributes.COLOR_0].count).toBe(start[k + 1] - start[k]);
      checked++;
    }
    expect(checked).toBe(25);
  });

  it('has four rod meshes of triangles with POSITION, NORMAL and in-range indices, in mm', () => {
    const { json } = parseGlb(bytes);
    const rods = json.nodes.filter((n: any) => /^rod [+−][xy]$/.test(n.name) && n.mesh !== undefined);
    // One rod (toward the iso viewer) is an outline: three solid rods plus one line node.
    expect(rods.length).toBe(3);
    for (const node of rods) {
      const prim = json.meshes[node.mesh].primitives[0];
      expect(prim.mode ?? 4).toBe(4);
      const pos = json.accessors[prim.attributes.POSITION];
      expect(json.accessors[prim.attributes.NORMAL].count).toBe(pos.count);
      expect(json.accessors[prim.indices].max[0]).toBeLessThan(pos.count);
      // Scene units mm: the 120 mm rods span z 0…120.
      expect(pos.min[2]).toBeCloseTo(0, 3);
      expect(pos.max[2]).toBeCloseTo(120, 3);
    }
    expect(json.scenes[0].extras?.units ?? json.nodes.find((n: any) => n.extras?.units)?.extras?.units).toBe('mm');
  });

  it('same run and options give the same bytes', async () => {
    const again = await renderGlb(run, { camera: 'iso', color: 'mz', rods: 'hyperbolic' });
    expect(Buffer.compare(Buffer.from(again), Buffer.from(bytes))).toBe(0);
  });
});
