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
let trap: RunView;
let bytes: Uint8Array;

beforeAll(async () => {
  tmp = mkdtempSync(join(tmpdir(), 'iontrail-glb-'));
  run = await readRunView(await makeRunFolder(join(tmp, 'filter'), { kind: 'filter', ions: 25, points: 120 }));
  trap = await readRunView(await makeRunFolder(join(tmp, 'trap'), { kind: 'trap', ions: 4, points: 60 }));
  bytes = await renderGlb(run, { camera: 'iso', color: 'mz', rods: 'hyperbolic' });
});
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

/** Float32 triples of an accessor (tightly packed or strided, glTF 2.0 §3.6.2.4). */
function vec3s(json: any, bin: Uint8Array, index: number): Float32Array {
  const acc = json.accessors[index], bv = json.bufferViews[acc.bufferView];
  const stride = bv.byteStride ?? 12, out = new Float32Array(3 * acc.count);
  const dv = new DataView(bin.buffer, bin.byteOffset + (bv.byteOffset ?? 0) + (acc.byteOffset ?? 0));
  for (let i = 0; i < acc.count; i++) for (let c = 0; c < 3; c++) out[3 * i + c] = dv.getFloat32(i * stride + 4 * c, true);
  return out;
}

function indices(json: any, bin: Uint8Array, index: number): Uint32Array {
  const acc = json.accessors[index], bv = json.bufferViews[acc.bufferView];
  const size = BYTES[acc.componentType], out = new Uint32Array(acc.count);
  const dv = new DataView(bin.buffer, bin.byteOffset + (bv.byteOffset ?? 0) + (acc.byteOffset ?? 0));
  for (let i = 0; i < acc.count; i++) out[i] = size === 4 ? dv.getUint32(4 * i, true) : size === 2 ? dv.getUint16(2 * i, true) : dv.getUint8(i);
  return out;
}

/**
 * Edges of a triangle mesh not shared by exactly two triangles, after welding vertices that sit
 * within 1e-3 mm of each other (seams split for normals or texture coordinates are one point of
 * the solid). A closed 2-manifold surface has none: every edge borders exactly two faces (M. Botsch
 * et al., "Polygon Mesh Processing" (2010), §1.2; from memory).
 */
export function openEdges(pos: Float32Array, idx: Uint32Array): number {
  const key = (i: number) => [0, 1, 2].map((c) => Math.round(pos[3 * i + c] * 1e3)).join(',');
  const weld = new Map<string, number>();
  const id = Array.from({ length: pos.length / 3 }, (_, i) => {
    const k = key(i);
    if (!weld.has(k)) weld.set(k, weld.size);
    return weld.get(k)!;
  });
  const edges = new Map<string, number>();
  for (let t = 0; t + 2 < idx.length; t += 3) {
    const v = [id[idx[t]], id[idx[t + 1]], id[idx[t + 2]]];
    if (v[0] === v[1] || v[1] === v[2] || v[0] === v[2]) continue; // degenerate after welding: no area
    for (let e = 0; e < 3; e++) {
      const a = v[e], b = v[(e + 1) % 3];
      const k = a < b ? `${a}-${b}` : `${b}-${a}`;
      edges.set(k, (edges.get(k) ?? 0) + 1);
    }
  }
  let open = 0;
  for (const n of edges.values()) if (n !== 2) open++;
  return open;
}

/** Named triangle meshes of a .glb with their open-edge counts. */
function solids(glb: Uint8Array, name: RegExp): { name: string; open: number; triangles: number }[] {
  const { json, bin } = parseGlb(glb);
  return json.nodes.filter((n: any) => name.test(n.name) && n.mesh !== undefined).map((n: any) => {
    const prim = json.meshes[n.mesh].primitives[0];
    expect(prim.mode ?? 4).toBe(4);
    const idx = indices(json, bin, prim.indices);
    return { name: n.name, open: openEdges(vec3s(json, bin, prim.attributes.POSITION), idx), triangles: idx.length / 3 };
  });
}

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
    // The rod the PNG draws as an outline for the iso camera is a solid here too.
    expect(rods.length).toBe(4);
    expect(json.nodes.some((n: any) => /outline/.test(n.name))).toBe(false);
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

  for (const rods of ['hyperbolic', 'cylindrical'] as const) {
    it(`every ${rods} rod is a closed solid read back from the .glb, whatever the camera`, async () => {
      for (const camera of ['iso', 'side', 'axial'] as const) {
        const found = solids(await renderGlb(run, { camera, color: 'time', rods }), /^rod [+−][xy]/);
        expect(found.map((f) => f.name).sort()).toEqual(['rod +x', 'rod +y', 'rod −x', 'rod −y']);
        for (const f of found) {
          expect(f.triangles).toBeGreaterThan(20);
          expect(f.open, `${f.name} (${camera})`).toBe(0);
        }
      }
    });
  }

  it('the trap ring and end caps are closed solids in the .glb', async () => {
    const found = solids(await renderGlb(trap, { camera: 'iso', color: 'time', rods: 'hyperbolic' }), /^(ring|end cap [+−]z)$/);
    expect(found.map((f) => f.name).sort()).toEqual(['end cap +z', 'end cap −z', 'ring']);
    for (const f of found) expect(f.open, f.name).toBe(0);
  });

  it('the edge check sees an open surface (a rod with one end face taken away)', () => {
    // A unit cube as 12 triangles is closed; dropping the two triangles of one face leaves that
    // face's 4 edges bordering one triangle each (its diagonal borders none and is gone).
    const p = new Float32Array([0, 0, 0, 1, 0, 0, 1, 1, 0, 0, 1, 0, 0, 0, 1, 1, 0, 1, 1, 1, 1, 0, 1, 1]);
    const faces = [[0, 2, 1], [0, 3, 2], [4, 5, 6], [4, 6, 7], [0, 1, 5], [0, 5, 4], [1, 2, 6], [1, 6, 5], [2, 3, 7], [2, 7, 6], [3, 0, 4], [3, 4, 7]];
    expect(openEdges(p, Uint32Array.from(faces.flat()))).toBe(0);
    expect(openEdges(p, Uint32Array.from(faces.slice(2).flat()))).toBe(4);
  });

  it('same run and options give the same bytes', async () => {
    const again = await renderGlb(run, { camera: 'iso', color: 'mz', rods: 'hyperbolic' });
    expect(Buffer.compare(Buffer.from(again), Buffer.from(bytes))).toBe(0);
  });
});
