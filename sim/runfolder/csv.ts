// Streaming CSV beside the Arrow files (--csv): a header row of the Arrow column names, then one
// line per row. Numbers are written with JavaScript's shortest round-trip form, so parsing the CSV
// gives back the exact float64 values. Strings (fate) never contain commas or quotes.

import { closeSync, openSync, writeSync } from 'node:fs';
import type { ColumnSpec } from './columns.js';

export class CsvFileStream {
  private fd: number;
  constructor(readonly path: string, private readonly specs: readonly ColumnSpec[]) {
    this.fd = openSync(path, 'wx');
    this.put(specs.map((s) => s.name).join(',') + '\n');
  }

  append(cols: Record<string, ArrayLike<unknown> | undefined>): void {
    const arrays = this.specs.map((s) => cols[s.name] as ArrayLike<unknown>);
    const n = arrays[0]?.length ?? 0;
    const lines: string[] = [];
    let bytes = 0;
    for (let r = 0; r < n; r++) {
      let line = '';
      for (let c = 0; c < arrays.length; c++) line += (c > 0 ? ',' : '') + String(arrays[c][r]);
      lines.push(line);
      bytes += line.length;
      // Flush in pieces so a huge batch does not build one huge string.
      if (bytes > 1 << 20) { this.put(lines.join('\n') + '\n'); lines.length = 0; bytes = 0; }
    }
    if (lines.length > 0) this.put(lines.join('\n') + '\n');
  }

  private put(text: string): void {
    const b = Buffer.from(text, 'utf8');
    let off = 0;
    while (off < b.byteLength) off += writeSync(this.fd, b, off, b.byteLength - off);
  }

  close(): void {
    if (this.fd >= 0) { closeSync(this.fd); this.fd = -1; }
  }
}
