// Field-folder file formats: NumPy .npy v1.0 (NumPy Enhancement Proposal 1, "A simple file format
// for NumPy arrays") and VTK ImageData XML (.vti, "VTK File Formats", Kitware).

import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { decodeNpy, encodeNpy, NpyError } from '../../sim/fields/npy.js';
import { encodeVti } from '../../sim/fields/vti.js';
import type { SolvedGrid } from '../../sim/fields/problem.js';
import { tempDir } from '../helpers/temp.js';

const hasNumpy = spawnSync('python3', ['-c', 'import numpy'], { encoding: 'utf8' }).status === 0;

describe('.npy', () => {
  const shape = [3, 4, 5];
  const data = Float64Array.from({ length: 60 }, (_, i) => Math.sin(i) * 10 ** (i % 7 - 3));

  it('round trip: header per NEP 1 (magic, v1.0, 64-byte aligned data), float32 values back', () => {
    const b = encodeNpy(data, shape);
    expect([...b.subarray(0, 8)]).toEqual([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, 1, 0]);
    const hlen = b[8] | (b[9] << 8);
    // NEP 1: the total of magic, version, length and header is divisible by 64 and the header ends in '\n'.
    expect((10 + hlen) % 64).toBe(0);
    expect(String.fromCharCode(b[10 + hlen - 1])).toBe('\n');
    expect(new TextDecoder().decode(b.subarray(10, 10 + hlen))).toMatch(/^\{'descr': '<f4', 'fortran_order': False, 'shape': \(3, 4, 5\), \} *\n$/);
    const back = decodeNpy(b);
    expect(back.shape).toEqual(shape);
    expect([...back.data]).toEqual([...Float32Array.from(data)]);
    expect(decodeNpy(encodeNpy([1, 2], [2])).shape).toEqual([2]);
    expect(() => encodeNpy(data, [7])).toThrow(NpyError);
    expect(() => decodeNpy(new Uint8Array(20))).toThrow(/magic/);
  });

  it.runIf(hasNumpy)('numpy.load reads the file: dtype, shape, C order and values (python3 numpy)', () => {
    const d = tempDir();
    const p = join(d, 'a.npy');
    writeFileSync(p, encodeNpy(data, shape));
    const r = spawnSync('python3', ['-c', `import numpy as np, json, sys
a = np.load(sys.argv[1])
print(json.dumps({"dtype": str(a.dtype), "shape": list(a.shape), "c": bool(a.flags["C_CONTIGUOUS"]), "v": float(a[1, 2, 3]), "s": float(a.astype(np.float64).sum())}))`, p], { encoding: 'utf8' });
    expect(r.status, r.stderr).toBe(0);
    const got = JSON.parse(r.stdout);
    expect(got.dtype).toBe('float32');
    expect(got.shape).toEqual(shape);
    expect(got.c).toBe(true);
    // C order: a[1, 2, 3] is element 1·20 + 2·5 + 3 = 33.
    expect(got.v).toBe(Math.fround(data[33]));
    const f32 = Float32Array.from(data);
    expect(got.s).toBeCloseTo(f32.reduce((a, b) => a + b, 0), 9);
    // And numpy's own file reads back here.
    const q = join(d, 'b.npy');
    expect(spawnSync('python3', ['-c', 'import numpy as np, sys; np.save(sys.argv[1], np.arange(6, dtype="<f4").reshape(2, 3))', q]).status).toBe(0);
    const back = decodeNpy(readFileSync(q));
    expect(back.shape).toEqual([2, 3]);
    expect([...back.data]).toEqual([0, 1, 2, 3, 4, 5]);
  });
  it.skipIf(hasNumpy)('numpy.load reads the file: skipped, python3 has no numpy on this machine', () => {});
});

describe('.vti', () => {
  it('well-formed ImageData with extent, origin, spacing and one base64 float32 array per electrode', () => {
    const grid: SolvedGrid = { symmetry: 'none', origin: [-0.001, 0, 0.002], spacing: 0.0005, shape: [4, 3, 2], mirror: [] };
    const a = Float64Array.from({ length: 24 }, (_, i) => i / 7);
    const b = Float64Array.from({ length: 24 }, (_, i) => -i);
    const text = encodeVti(grid, [{ name: 'x-pair', values: a }, { name: 'plate <1>', values: b }]);
    expect(text).toMatch(/^<\?xml version="1.0"\?>\n<VTKFile type="ImageData" version="1.0" byte_order="LittleEndian" header_type="UInt32">/);
    expect(text).toContain('<ImageData WholeExtent="0 3 0 2 0 1" Origin="-0.001 0 0.002" Spacing="0.0005 0.0005 0.0005">');
    expect(text).toContain('<Piece Extent="0 3 0 2 0 1">');
    // Balanced elements (a well-formedness check without an XML library): each opening tag closed.
    for (const tag of ['VTKFile', 'ImageData', 'Piece', 'PointData', 'DataArray']) {
      const open = text.match(new RegExp(`<${tag}[ >]`, 'g'))?.length ?? 0;
      expect(open, tag).toBe(text.match(new RegExp(`</${tag}>`, 'g'))?.length ?? 0);
      expect(open).toBeGreaterThan(0);
    }
    expect(text).toContain('Name="plate &lt;1&gt;"');
    // The data: UInt32 byte count, then the values as little-endian float32, x fastest.
    const blocks = [...text.matchAll(/format="binary">\s*([A-Za-z0-9+/=]+)\s*</g)].map((m) => Buffer.from(m[1], 'base64'));
    expect(blocks).toHaveLength(2);
    for (const [blk, want] of [[blocks[0], a], [blocks[1], b]] as const) {
      expect(blk.readUInt32LE(0)).toBe(96);
      for (let i = 0; i < 24; i++) expect(blk.readFloatLE(4 + 4 * i)).toBe(Math.fround(want[i]));
    }
  });
});
