// VTK ImageData XML files (.vti, "VTK File Formats", VTK User's Guide, Kitware, XML formats):
// one <Piece> with the grid's extent, origin and spacing, and one float32 PointData array per
// unit solution, stored inline as base64 "binary" data (a UInt32 byte count, then the values,
// little-endian). VTK's point order runs x fastest, which is the order of a SolvedGrid's arrays.

import type { SolvedGrid } from './problem.js';

export interface VtiArray {
  name: string;
  values: ArrayLike<number>;
}

function base64Block(values: ArrayLike<number>): string {
  const bytes = new Uint8Array(4 + 4 * values.length);
  const dv = new DataView(bytes.buffer);
  dv.setUint32(0, 4 * values.length, true);
  for (let i = 0; i < values.length; i++) dv.setFloat32(4 + 4 * i, values[i], true);
  return Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength).toString('base64');
}

const attr = (s: string) => s.replace(/&/g, '&amp;').replace(/"/g, '&quot;').replace(/</g, '&lt;').replace(/>/g, '&gt;');

/**
 * The .vti text of arrays on the grid. Axial grids are written as the (x = r, y = z) plane; the
 * coordinates are SI metres, stage-local.
 */
export function encodeVti(grid: SolvedGrid, arrays: readonly VtiArray[]): string {
  const [n0, n1, n2] = grid.shape;
  const count = n0 * n1 * n2;
  const extent = `0 ${n0 - 1} 0 ${n1 - 1} 0 ${n2 - 1}`;
  const o = grid.origin;
  const h = grid.spacing;
  const lines = [
    '<?xml version="1.0"?>',
    '<VTKFile type="ImageData" version="1.0" byte_order="LittleEndian" header_type="UInt32">',
    `  <ImageData WholeExtent="${extent}" Origin="${o[0]} ${o[1]} ${o[2]}" Spacing="${h} ${h} ${h}">`,
    `    <Piece Extent="${extent}">`,
    `      <PointData Scalars="${attr(arrays[0]?.name ?? '')}">`,
  ];
  for (const a of arrays) {
    if (a.values.length !== count) throw new Error(`array '${a.name}' holds ${a.values.length} values, the grid ${count}`);
    lines.push(`        <DataArray type="Float32" Name="${attr(a.name)}" NumberOfComponents="1" format="binary">`);
    lines.push(`          ${base64Block(a.values)}`);
    lines.push('        </DataArray>');
  }
  lines.push('      </PointData>', '      <CellData/>', '    </Piece>', '  </ImageData>', '</VTKFile>', '');
  return lines.join('\n');
}
