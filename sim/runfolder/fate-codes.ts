// The fate codes of a utf8 fate column read from ions.arrow, taken from its bytes: a merge tallies
// fates for every ion, and decoding each name into a string and looking it up costs more than the
// rest of the merge together.

import type { Data } from 'apache-arrow';
import { FATE_NAMES } from '../core/batch.js';
import { RunFolderError } from './errors.js';

const NAME_BYTES = FATE_NAMES.map((n) => new TextEncoder().encode(n));

/** Code k of FATE_NAMES per row; a name that is none of them is a one-line error naming `path`. */
export function fateCodes(d: Data, path: string): Int8Array {
  const offsets = d.valueOffsets as Int32Array;
  const bytes = d.values as Uint8Array;
  const out = new Int8Array(d.length);
  for (let k = 0; k < d.length; k++) {
    const start = offsets[d.offset + k], len = offsets[d.offset + k + 1] - start;
    let code = -1;
    for (let c = 0; c < NAME_BYTES.length && code < 0; c++) {
      const name = NAME_BYTES[c];
      if (name.length !== len) continue;
      let same = true;
      for (let j = 0; j < len && same; j++) same = bytes[start + j] === name[j];
      if (same) code = c;
    }
    if (code < 0) {
      throw new RunFolderError(`${path}: fate '${new TextDecoder().decode(bytes.subarray(start, start + len))}' of row ${k} is not one of ${FATE_NAMES.join(', ')}`);
    }
    out[k] = code;
  }
  return out;
}
