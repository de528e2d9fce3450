// Streaming Arrow IPC *file* writer: record batches go to disk as they are appended, so a run that
// records 1e8 trajectory points never holds them in memory. apache-arrow 21.2.0's
// RecordBatchFileWriter accepts an AsyncByteQueue as its sink; the queue below writes every chunk
// straight to a file descriptor (through a 1 MiB buffer, because the writer emits many 4–8 byte
// pieces) instead of queueing it for a reader. The footer (the index of batches that makes random
// access possible) is written by finish().

import { closeSync, openSync, writeSync } from 'node:fs';
import {
  AsyncByteQueue, Field, Float64, Int32, makeData, RecordBatch, RecordBatchFileWriter, Schema, Struct, Utf8,
  vectorFromArray, type DataType, type Data,
} from 'apache-arrow';
import type { ColumnSpec } from './columns.js';
import { RunFolderError } from './errors.js';

const FLUSH_BYTES = 1 << 20;

class FileSink extends AsyncByteQueue {
  private readonly buf = new Uint8Array(FLUSH_BYTES);
  private used = 0;
  constructor(private fd: number) { super(); }

  override write(value: ArrayBufferView | ArrayBuffer | string): void {
    const bytes = typeof value === 'string' ? new TextEncoder().encode(value)
      : value instanceof ArrayBuffer ? new Uint8Array(value)
        : new Uint8Array(value.buffer, value.byteOffset, value.byteLength);
    if (bytes.byteLength === 0) return;
    if (this.used + bytes.byteLength > this.buf.byteLength) this.flush();
    if (bytes.byteLength >= this.buf.byteLength) { writeAll(this.fd, bytes); return; }
    this.buf.set(bytes, this.used);
    this.used += bytes.byteLength;
  }

  flush(): void {
    if (this.used > 0) writeAll(this.fd, this.buf.subarray(0, this.used));
    this.used = 0;
  }

  override close(): void {
    if (this.fd >= 0) { this.flush(); closeSync(this.fd); this.fd = -1; }
    super.close();
  }
}

function writeAll(fd: number, bytes: Uint8Array): void {
  let off = 0;
  while (off < bytes.byteLength) off += writeSync(fd, bytes, off, bytes.byteLength - off);
}

function arrowType(kind: ColumnSpec['kind']): DataType {
  return kind === 'int32' ? new Int32() : kind === 'float64' ? new Float64() : new Utf8();
}

export function schemaOf(columns: readonly ColumnSpec[]): Schema {
  return new Schema(columns.map((c) => new Field(c.name, arrowType(c.kind), false)));
}

/** Copy a numeric column into the typed array Arrow stores (no copy when it already is one). */
function numericData(spec: ColumnSpec, values: ArrayLike<number>, n: number): Data {
  if (spec.kind === 'int32') {
    const a = values instanceof Int32Array ? values : Int32Array.from(values as ArrayLike<number>);
    return makeData({ type: new Int32(), length: n, nullCount: 0, data: a });
  }
  const a = values instanceof Float64Array ? values : Float64Array.from(values as ArrayLike<number>);
  return makeData({ type: new Float64(), length: n, nullCount: 0, data: a });
}

/**
 * One record batch from columns given by name. Every column of `specs` must be present with the
 * same length; `table` names the file for the error message.
 */
export function makeBatch(
  schema: Schema, specs: readonly ColumnSpec[], cols: Record<string, ArrayLike<unknown> | undefined>, table: string,
): RecordBatch {
  let n = -1;
  const children: Data[] = [];
  for (const spec of specs) {
    const values = cols[spec.name];
    if (values === undefined) throw new RunFolderError(`${table}: column '${spec.name}' missing from the batch`);
    if (n < 0) n = values.length;
    else if (values.length !== n) {
      throw new RunFolderError(`${table}: column '${spec.name}' has ${values.length} rows, expected ${n}`);
    }
    children.push(spec.kind === 'utf8'
      ? vectorFromArray(Array.from(values as ArrayLike<string>, String), new Utf8()).data[0]
      : numericData(spec, values as ArrayLike<number>, values.length));
  }
  if (n < 0) n = 0;
  const struct = makeData({ type: new Struct(schema.fields), length: n, nullCount: 0, children });
  return new RecordBatch(schema, struct);
}

/** An Arrow IPC file being written batch by batch. */
export class ArrowFileStream {
  readonly schema: Schema;
  private readonly writer: RecordBatchFileWriter;
  private readonly sink: FileSink;
  private open = true;
  rows = 0;

  constructor(readonly path: string, readonly specs: readonly ColumnSpec[], readonly table: string) {
    this.schema = schemaOf(specs);
    this.sink = new FileSink(openSync(path, 'wx'));
    this.writer = new RecordBatchFileWriter();
    this.writer.reset(this.sink, this.schema); // writes the leading magic at once
  }

  append(cols: Record<string, ArrayLike<unknown> | undefined>): number {
    if (!this.open) throw new RunFolderError(`${this.path}: already finished`);
    const batch = makeBatch(this.schema, this.specs, cols, this.table);
    if (batch.numRows > 0) this.writer.write(batch);
    this.rows += batch.numRows;
    return batch.numRows;
  }

  /**
   * One record batch from Data read from a file of the same columns (columnBatches in reader.ts),
   * written unchanged under this file's schema: no decoding, no per-row work.
   */
  appendData(columns: readonly Data[], rows: number): number {
    if (!this.open) throw new RunFolderError(`${this.path}: already finished`);
    if (columns.length !== this.specs.length) throw new RunFolderError(`${this.table}: ${columns.length} columns in the batch, expected ${this.specs.length}`);
    columns.forEach((c, k) => {
      if (c.length !== rows) throw new RunFolderError(`${this.table}: column '${this.specs[k].name}' has ${c.length} rows, expected ${rows}`);
    });
    const struct = makeData({ type: new Struct(this.schema.fields), length: rows, nullCount: 0, children: columns as Data[] });
    if (rows > 0) this.writer.write(new RecordBatch(this.schema, struct));
    this.rows += rows;
    return rows;
  }

  /** Write the footer and close the file. */
  finish(): void {
    if (!this.open) return;
    this.open = false;
    this.writer.finish(); // footer + close of the sink (the file writer auto-destroys)
    this.sink.close();
  }

  /** Close without a footer (the file is then invalid; the caller deletes it). */
  discard(): void {
    if (!this.open) return;
    this.open = false;
    this.sink.close();
  }
}
