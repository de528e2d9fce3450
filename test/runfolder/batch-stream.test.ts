// The merge's sequential batch reader (columnBatches) and the fate codes read from utf8 bytes
// (fateCodes), against apache-arrow 21.2.0's own whole-file reader (tableFromIPC) and the
// TextDecoder's reading of the same bytes.

import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { tableFromIPC, Utf8, vectorFromArray } from 'apache-arrow';
import { tempDir } from '../helpers/temp.js';
import { ArrowFileStream } from '../../sim/runfolder/arrowFile.js';
import { columnBatches } from '../../sim/runfolder/reader.js';
import { fateCodes } from '../../sim/runfolder/fate-codes.js';
import { FATE_NAMES } from '../../sim/core/batch.js';
import type { ColumnSpec } from '../../sim/runfolder/columns.js';

const SPECS: ColumnSpec[] = [{ name: 'ion', kind: 'int32' }, { name: 'fate', kind: 'utf8' }, { name: 'end_time', kind: 'float64' }];
const FATES = ['alive', 'detected', 'hit', 'missed', 'returned'];

/** Three batches of 5, 0 and 1 200 rows (an empty batch is not written), through the project's writer. */
function writeFile(dir: string): string {
  const path = join(dir, 't.arrow');
  const f = new ArrowFileStream(path, SPECS, 'test');
  let ion = 0;
  for (const n of [5, 0, 1200]) {
    const ions = Int32Array.from({ length: n }, () => ion++);
    f.append({ ion: ions, fate: Array.from(ions, (i) => FATES[(i * 7) % 5]), end_time: Float64Array.from(ions, (i) => i * 1e-6 + 0.5) });
  }
  f.finish();
  return path;
}

describe('columnBatches: a file read batch by batch, in order', () => {
  it('gives the rows apache-arrow reads from the whole file, batch by batch, in the specs\' order', () => {
    const path = writeFile(tempDir());
    const whole = tableFromIPC(readFileSync(path));
    const batches = [...columnBatches(path, [SPECS[2], SPECS[0], SPECS[1]])];
    expect(batches.map((b) => b.rows)).toEqual([5, 1200]);
    const got = { end_time: [] as number[], ion: [] as number[], fate: [] as string[] };
    for (const b of batches) {
      got.end_time.push(...(b.columns[0].values as Float64Array).subarray(0, b.rows));
      got.ion.push(...(b.columns[1].values as Int32Array).subarray(0, b.rows));
      const offsets = b.columns[2].valueOffsets as Int32Array, bytes = b.columns[2].values as Uint8Array;
      for (let k = 0; k < b.rows; k++) got.fate.push(new TextDecoder().decode(bytes.subarray(offsets[k], offsets[k + 1])));
    }
    expect(got.ion).toEqual(Array.from(whole.getChild('ion')!.toArray() as Int32Array));
    expect(got.end_time).toEqual(Array.from(whole.getChild('end_time')!.toArray() as Float64Array));
    expect(got.fate).toEqual(whole.getChild('fate')!.toArray());
  });

  it('a column the file lacks, or of another type, is one line naming the file', () => {
    const path = writeFile(tempDir());
    expect(() => [...columnBatches(path, [{ name: 'end_ke_ev', kind: 'float64' }])]).toThrow(/t\.arrow: column 'end_ke_ev' missing/);
    expect(() => [...columnBatches(path, [{ name: 'ion', kind: 'float64' }])]).toThrow(/t\.arrow: column 'ion' is not float64/);
  });
});

describe('fateCodes: fate names from the utf8 bytes', () => {
  it('codes in FATE_NAMES order, as the decoded strings give them', () => {
    const names = ['detected', 'alive', 'returned', 'hit', 'missed', 'detected', 'alive'];
    const codes = fateCodes(vectorFromArray(names, new Utf8()).data[0], 'ions.arrow');
    expect(Array.from(codes)).toEqual(names.map((n) => (FATE_NAMES as readonly string[]).indexOf(n)));
  });

  it('a name that is no fate (a prefix, a longer word) is refused with its row', () => {
    expect(() => fateCodes(vectorFromArray(['alive', 'ali'], new Utf8()).data[0], 'p/ions.arrow')).toThrow(/p\/ions\.arrow: fate 'ali' of row 1 is not one of/);
    expect(() => fateCodes(vectorFromArray(['detectedx'], new Utf8()).data[0], 'p/ions.arrow')).toThrow(/fate 'detectedx' of row 0/);
  });
});
