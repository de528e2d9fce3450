// NumPy .npy files, format version 1.0 (NumPy Enhancement Proposal 1, "A simple file format for
// NumPy arrays"): the magic "\x93NUMPY", version bytes 1 0, a little-endian uint16 header length,
// an ASCII Python-dict header padded with spaces and ended by "\n" so that the data starts on a
// multiple of 64 bytes, then the data. Here always float32 little-endian ('<f4') in C order.

const MAGIC = [0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59];

export class NpyError extends Error {
  override name = 'NpyError';
}

/** The .npy bytes of `data` (any float array, stored as float32) with the given C-order shape. */
export function encodeNpy(data: ArrayLike<number>, shape: readonly number[]): Uint8Array {
  const count = shape.reduce((a, b) => a * b, 1);
  if (count !== data.length) throw new NpyError(`shape [${shape.join(', ')}] holds ${count} values, got ${data.length}`);
  const dims = shape.length === 1 ? `${shape[0]},` : shape.join(', ');
  let header = `{'descr': '<f4', 'fortran_order': False, 'shape': (${dims}), }`;
  const pad = 64 - ((MAGIC.length + 4 + header.length + 1) % 64);
  header += ' '.repeat(pad % 64) + '\n';
  const start = MAGIC.length + 4 + header.length;
  const out = new Uint8Array(start + 4 * count);
  out.set(MAGIC, 0);
  out[6] = 1; out[7] = 0;
  new DataView(out.buffer).setUint16(8, header.length, true);
  for (let i = 0; i < header.length; i++) out[10 + i] = header.charCodeAt(i);
  const view = new DataView(out.buffer, start);
  for (let i = 0; i < count; i++) view.setFloat32(4 * i, data[i], true);
  return out;
}

/** Values and shape of a float32 little-endian, C-order .npy file (version 1.0, 2.0 or 3.0). */
export function decodeNpy(bytes: Uint8Array): { data: Float32Array; shape: number[] } {
  for (let i = 0; i < MAGIC.length; i++) if (bytes[i] !== MAGIC[i]) throw new NpyError('not a .npy file (no \\x93NUMPY magic)');
  const dv = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const major = bytes[6];
  const wide = major >= 2;
  const hlen = wide ? dv.getUint32(8, true) : dv.getUint16(8, true);
  const hstart = wide ? 12 : 10;
  const header = new TextDecoder('latin1').decode(bytes.subarray(hstart, hstart + hlen));
  const descr = /'descr':\s*'([^']*)'/.exec(header)?.[1];
  if (descr !== '<f4') throw new NpyError(`expects float32 little-endian ('<f4') data, got '${descr ?? '?'}'`);
  if (!/'fortran_order':\s*False/.test(header)) throw new NpyError('expects C order (fortran_order False)');
  const dims = /'shape':\s*\(([^)]*)\)/.exec(header)?.[1];
  if (dims === undefined) throw new NpyError('header has no shape');
  const shape = dims.split(',').map((s) => s.trim()).filter((s) => s !== '').map(Number);
  const count = shape.reduce((a, b) => a * b, 1);
  const start = hstart + hlen;
  if (bytes.byteLength < start + 4 * count) throw new NpyError(`file holds fewer than the ${count} values its shape says`);
  const data = new Float32Array(count);
  for (let i = 0; i < count; i++) data[i] = dv.getFloat32(start + 4 * i, true);
  return { data, shape };
}
