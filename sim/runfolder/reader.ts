// Reading run folders back: summary.json, the ions table (whole, it is one row per ion) and the
// trajectories (batch by batch through a file handle, so a caller can pick some ions or every n-th
// point without loading a 1e8-point file). Every failure is a one-line RunFolderError naming the path.

import { closeSync, existsSync, fstatSync, openSync, readFileSync, readSync, statSync } from 'node:fs';
import { open, type FileHandle } from 'node:fs/promises';
import { join } from 'node:path';
import { Float64, Int32, RecordBatchReader, Table as ArrowTable, tableFromIPC, tableToIPC, Utf8, type Data, type RecordBatch, type Schema, type Table } from 'apache-arrow';
import {
  HISTORY_COLUMNS, ION_COLUMNS, TRAJECTORY_COLUMNS, SPECIES_HISTORY_COLUMNS, type SpeciesHistoryColumns,
  type ColumnSpec, type FateName, type HistoryColumns, type IonColumns, type TrajectoryColumns,
} from './columns.js';
import { RunFolderError } from './errors.js';
import type { RunSummary } from './summary.js';
import { FILES } from './writer.js';

export interface RunFolder {
  dir: string;
  summary: RunSummary;
  ions: IonColumns;
  hasTrajectories: boolean;
  hasHistory: boolean;
}

const MAGIC = 'ARROW1';

function firstLine(err: unknown): string {
  return (err instanceof Error ? err.message : String(err)).split('\n')[0];
}

function checkFolder(dir: string): void {
  if (!existsSync(dir)) throw new RunFolderError(`${dir}: no such folder`);
  if (!statSync(dir).isDirectory()) throw new RunFolderError(`${dir}: not a folder (expected a run folder)`);
  if (!existsSync(join(dir, FILES.summary))) {
    throw new RunFolderError(`${dir}: not a run folder (no ${FILES.summary})`);
  }
}

/** summary.json of a run folder. */
export function readSummary(dir: string): RunSummary {
  checkFolder(dir);
  const path = join(dir, FILES.summary);
  let value: unknown;
  try {
    value = JSON.parse(readFileSync(path, 'utf8'));
  } catch (err) {
    throw new RunFolderError(`${path}: not valid JSON (${firstLine(err)})`);
  }
  if (value === null || typeof value !== 'object' || Array.isArray(value)) {
    throw new RunFolderError(`${path}: expected a JSON object`);
  }
  return value as RunSummary;
}

/** An Arrow IPC file starts and ends with "ARROW1"; a missing end marker means a truncated file. */
function checkMagic(path: string, head: Uint8Array, tail: Uint8Array, size: number): void {
  const dec = new TextDecoder();
  if (size < 12 || dec.decode(head) !== MAGIC) throw new RunFolderError(`${path}: not an Arrow IPC file`);
  if (dec.decode(tail) !== MAGIC) throw new RunFolderError(`${path}: truncated Arrow IPC file (no footer)`);
}

function readTable(path: string): Table {
  if (!existsSync(path)) throw new RunFolderError(`${path}: missing`);
  const bytes = readFileSync(path);
  checkMagic(path, bytes.subarray(0, 6), bytes.subarray(bytes.byteLength - 6), bytes.byteLength);
  try {
    return tableFromIPC(bytes);
  } catch (err) {
    throw new RunFolderError(`${path}: unreadable Arrow IPC file (${firstLine(err)})`);
  }
}

function columnsOf<T>(table: Table, specs: readonly ColumnSpec[], path: string): T {
  const out: Record<string, unknown> = {};
  for (const spec of specs) {
    const child = table.getChild(spec.name);
    if (child === null && spec.since !== undefined) { out[spec.name] = new Float64Array(table.numRows).fill(NaN); continue; }
    if (child === null) throw new RunFolderError(`${path}: column '${spec.name}' missing`);
    if (spec.kind === 'utf8') out[spec.name] = Array.from(child.toArray() as ArrayLike<string>);
    else {
      const a = child.toArray() as Int32Array | Float64Array;
      const want = spec.kind === 'int32' ? Int32Array : Float64Array;
      if (!(a instanceof want)) throw new RunFolderError(`${path}: column '${spec.name}' is not ${spec.kind}`);
      out[spec.name] = a;
    }
  }
  return out as T;
}

/** The ions table, whole. */
export function readIons(dir: string): IonColumns {
  const path = join(dir, FILES.ions);
  return columnsOf<IonColumns & { fate: FateName[] }>(readTable(path), ION_COLUMNS, path);
}

/** history.arrow (ensemble averages against time), or null when the run has none. */
export function readHistory(dir: string): HistoryColumns | null {
  const path = join(dir, FILES.history);
  if (!existsSync(path)) return null;
  return columnsOf<HistoryColumns>(readTable(path), HISTORY_COLUMNS, path);
}

/** history_species.arrow (the history per population), or null when the run has none. */
export function readSpeciesHistory(dir: string): SpeciesHistoryColumns | null {
  const path = join(dir, FILES.speciesHistory);
  if (!existsSync(path)) return null;
  return columnsOf<SpeciesHistoryColumns>(readTable(path), SPECIES_HISTORY_COLUMNS, path);
}

/** summary.json and the ions table of a run folder. */
export async function readRunFolder(dir: string): Promise<RunFolder> {
  const summary = readSummary(dir);
  return {
    dir,
    summary,
    ions: readIons(dir),
    hasTrajectories: existsSync(join(dir, FILES.trajectories)),
    hasHistory: existsSync(join(dir, FILES.history)),
  };
}

/** Random access to the record batches of trajectories.arrow. */
export class TrajectoryFile {
  private constructor(
    readonly path: string, private readonly handle: FileHandle,
    private readonly reader: Awaited<ReturnType<typeof openReader>>,
  ) {}

  static async open(dir: string): Promise<TrajectoryFile> {
    const path = join(dir, FILES.trajectories);
    if (!existsSync(path)) throw new RunFolderError(`${path}: missing (the run recorded no trajectories)`);
    const handle = await open(path, 'r');
    try {
      const { size } = await handle.stat();
      const head = new Uint8Array(6);
      const tail = new Uint8Array(6);
      await handle.read(head, 0, 6, 0);
      await handle.read(tail, 0, 6, Math.max(0, size - 6));
      checkMagic(path, head, tail, size);
      const reader = await openReader(handle, path);
      for (const spec of TRAJECTORY_COLUMNS) {
        if (!reader.schema.fields.some((f) => f.name === spec.name)) {
          throw new RunFolderError(`${path}: column '${spec.name}' missing`);
        }
      }
      return new TrajectoryFile(path, handle, reader);
    } catch (err) {
      await handle.close();
      throw err;
    }
  }

  get batchCount(): number { return this.reader.numRecordBatches; }

  /** Columns of record batch `i` (0 ≤ i < batchCount). */
  async batch(i: number): Promise<TrajectoryColumns> {
    let b: RecordBatch | null;
    try {
      b = await this.reader.readRecordBatch(i);
    } catch (err) {
      throw new RunFolderError(`${this.path}: batch ${i} unreadable (${firstLine(err)})`);
    }
    if (b === null) throw new RunFolderError(`${this.path}: batch ${i} missing`);
    const out: Record<string, unknown> = {};
    for (const spec of TRAJECTORY_COLUMNS) out[spec.name] = b.getChild(spec.name)!.toArray();
    return out as unknown as TrajectoryColumns;
  }

  async close(): Promise<void> {
    await this.handle.close();
  }
}

async function openReader(handle: FileHandle, path: string) {
  let reader: RecordBatchReader;
  try {
    reader = await RecordBatchReader.from(handle as unknown as Parameters<typeof RecordBatchReader.from>[0]);
    await reader.open();
  } catch (err) {
    throw new RunFolderError(`${path}: unreadable Arrow IPC file (${firstLine(err)})`);
  }
  if (!reader.isFile() || !reader.isAsync()) throw new RunFolderError(`${path}: not an Arrow IPC file`);
  return reader as unknown as {
    schema: { fields: { name: string }[] };
    numRecordBatches: number;
    readRecordBatch(i: number): Promise<RecordBatch | null>;
  };
}

/** Bytes per trajectory row in the Arrow body: one Int32 and seven Float64 columns. */
const TRAJECTORY_ROW_BYTES = 4 + 7 * 8;

/**
 * Number of recorded points, estimated from the file size without reading it (within a few per
 * cent: headers and padding are small against the bodies). 0 when there is no trajectories file.
 */
export function estimateTrajectoryRows(dir: string): number {
  const path = join(dir, FILES.trajectories);
  return existsSync(path) ? Math.floor(statSync(path).size / TRAJECTORY_ROW_BYTES) : 0;
}

/** Every record batch of trajectories.arrow in order, one at a time (for streaming consumers). */
export async function* trajectoryBatches(dir: string): AsyncGenerator<TrajectoryColumns> {
  const file = await TrajectoryFile.open(dir);
  try {
    for (let i = 0; i < file.batchCount; i++) yield await file.batch(i);
  } finally {
    await file.close();
  }
}

/**
 * Every record batch of any Arrow IPC file of the folder in order, one at a time, as columns of
 * `specs` (utf8 as string arrays): a merge streams tables of any size through it.
 */
export async function* tableBatches<T>(path: string, specs: readonly ColumnSpec[]): AsyncGenerator<T> {
  if (!existsSync(path)) throw new RunFolderError(`${path}: missing`);
  const handle = await open(path, 'r');
  try {
    const { size } = await handle.stat();
    const head = new Uint8Array(6), tail = new Uint8Array(6);
    await handle.read(head, 0, 6, 0);
    await handle.read(tail, 0, 6, Math.max(0, size - 6));
    checkMagic(path, head, tail, size);
    const reader = await openReader(handle, path);
    for (let i = 0; i < reader.numRecordBatches; i++) {
      let b: RecordBatch | null;
      try {
        b = await reader.readRecordBatch(i);
      } catch (err) {
        throw new RunFolderError(`${path}: batch ${i} unreadable (${firstLine(err)})`);
      }
      if (b === null) throw new RunFolderError(`${path}: batch ${i} missing`);
      yield columnsOf<T>(b as unknown as Table, specs, path);
    }
  } finally {
    await handle.close();
  }
}

/** Bytes read at a time by the sequential batch reader: large reads, few calls (1 MiB read fastest here). */
const CHUNK_BYTES = 1 << 20;

/** Up to n bytes of fd from `at` (fewer at the end of the file), in a fresh buffer. */
function readAt(fd: number, at: number, n: number): Uint8Array {
  const b = new Uint8Array(n);
  let got = 0;
  while (got < n) {
    const k = readSync(fd, b, got, n - got, at + got);
    if (k === 0) break;
    got += k;
  }
  return b.subarray(0, got);
}

/** The bytes of fd from `start` to `end`, CHUNK_BYTES at a time (fresh buffers: batches view them). */
function* fileChunks(fd: number, start: number, end: number): Generator<Uint8Array> {
  for (let at = start; at < end;) {
    const buf = readAt(fd, at, Math.min(CHUNK_BYTES, end - at));
    if (buf.byteLength === 0) return;
    at += buf.byteLength;
    yield buf;
  }
}

/**
 * The schema of an Arrow IPC file from its footer alone. apache-arrow's file writer keeps the
 * schema only in the footer (the stream section starts with the first record batch), and the
 * library has no public footer decoder; so the footer and its length are wrapped in the file
 * format's magic and read by the library's own file reader, which decodes the footer and reads
 * no batch. Returns the schema as a stream message (to put before the stream section) too.
 */
function footerSchema(fd: number, size: number, path: string): { schema: Schema; message: Uint8Array } {
  const len = new DataView(readAt(fd, size - 10, 4).buffer).getInt32(0, true);
  if (!(len > 0 && len < size - 18)) throw new RunFolderError(`${path}: unreadable Arrow IPC file (footer length ${len})`);
  const footer = readAt(fd, size - 10 - len, len + 4);
  const wrapped = new Uint8Array(8 + footer.byteLength + 6);
  const magic = new TextEncoder().encode(MAGIC);
  wrapped.set(magic, 0);
  wrapped.set(footer, 8);
  wrapped.set(magic, 8 + footer.byteLength);
  const reader = RecordBatchReader.from(wrapped);
  reader.open();
  const schema = reader.schema;
  const stream = tableToIPC(new ArrowTable(schema), 'stream');
  return { schema, message: stream.subarray(0, stream.byteLength - 8) }; // without the end-of-stream marker
}

const ARROW_TYPE = { int32: String(new Int32()), float64: String(new Float64()), utf8: String(new Utf8()) } as const;

/**
 * Every record batch of an Arrow IPC file in order, as the Data of `specs`' columns (in specs'
 * order, the layout RunFolderWriter writes). The file is read sequentially, as the IPC stream it
 * holds after its 8-byte magic (up to the end-of-stream marker before the footer) behind its
 * schema taken from the footer, in 1 MiB reads: one batch in memory at a time, no per-row
 * objects, no async round trip per message. Every column must be there with its type (a merge
 * passes the batches on unchanged).
 */
export function* columnBatches(path: string, specs: readonly ColumnSpec[]): Generator<{ rows: number; columns: Data[] }> {
  if (!existsSync(path)) throw new RunFolderError(`${path}: missing`);
  const fd = openSync(path, 'r');
  try {
    const size = fstatSync(fd).size;
    checkMagic(path, readAt(fd, 0, 6), readAt(fd, Math.max(0, size - 6), 6), size);
    let it: Iterator<RecordBatch>;
    let index: number[];
    try {
      const { schema, message } = footerSchema(fd, size, path);
      index = specs.map((spec) => {
        const k = schema.fields.findIndex((f) => f.name === spec.name);
        if (k < 0) throw new RunFolderError(`${path}: column '${spec.name}' missing`);
        if (String(schema.fields[k].type) !== ARROW_TYPE[spec.kind]) throw new RunFolderError(`${path}: column '${spec.name}' is not ${spec.kind}`);
        return k;
      });
      const chunks = (function* () { yield message; yield* fileChunks(fd, 8, size); })();
      const reader = RecordBatchReader.from(chunks);
      reader.open();
      it = (reader as unknown as Iterable<RecordBatch>)[Symbol.iterator]();
    } catch (err) {
      if (err instanceof RunFolderError) throw err;
      throw new RunFolderError(`${path}: unreadable Arrow IPC file (${firstLine(err)})`);
    }
    for (let i = 0; ; i++) {
      let r: IteratorResult<RecordBatch>;
      try {
        r = it.next();
      } catch (err) {
        throw new RunFolderError(`${path}: batch ${i} unreadable (${firstLine(err)})`);
      }
      if (r.done) break;
      const children = r.value.data.children;
      yield { rows: r.value.numRows, columns: index.map((k) => children[k]) };
    }
  } finally {
    closeSync(fd);
  }
}

export interface TrajectorySelection {
  /** Only these ions (any order; output stays in ion order). */
  ions?: readonly number[];
  /** Keep every n-th recorded point of each ion (1 = all), counted from each ion's first point. */
  everyNth?: number;
}

/** Growable column of float64 (amortised doubling; no per-point allocation). */
class Grow<T extends Float64Array | Int32Array> {
  n = 0;
  constructor(public a: T) {}
  private reserve(extra: number): void {
    if (this.n + extra <= this.a.length) return;
    const b = new (this.a.constructor as new (n: number) => T)(Math.max(1024, this.a.length * 2, this.n + extra));
    b.set(this.a.subarray(0, this.n));
    this.a = b;
  }
  push(v: number): void {
    if (this.n === this.a.length) this.reserve(1);
    this.a[this.n++] = v;
  }
  pushRange(src: Float64Array | Int32Array, start: number, end: number): void {
    this.reserve(end - start);
    this.a.set(src.subarray(start, end), this.n);
    this.n += end - start;
  }
  done(): T { return this.a.subarray(0, this.n) as T; }
}

/**
 * Recorded points, optionally of some ions only and decimated. Batches entirely before the first
 * wanted ion are skipped by a binary search over the batches' first ions (points are in ion order),
 * and reading stops after the last wanted ion.
 */
export async function readTrajectories(dir: string, sel: TrajectorySelection = {}): Promise<TrajectoryColumns> {
  const every = sel.everyNth ?? 1;
  if (!Number.isInteger(every) || every < 1) throw new RunFolderError(`everyNth must be a positive integer, got ${every}`);
  const wanted = sel.ions ? new Set(sel.ions) : null;
  const lo = wanted && wanted.size > 0 ? Math.min(...wanted) : -Infinity;
  const hi = wanted ? (wanted.size > 0 ? Math.max(...wanted) : -Infinity) : Infinity;
  const names = TRAJECTORY_COLUMNS.map((c) => c.name);
  const cols = names.map((name) => (name === 'ion' ? new Grow(new Int32Array(0)) : new Grow(new Float64Array(0))));
  const file = await TrajectoryFile.open(dir);
  try {
    let start = 0;
    if (wanted !== null && file.batchCount > 1) {
      // Last batch whose first ion is below lo: the wanted ion's points may begin inside it.
      let a = 0, b = file.batchCount - 1;
      while (a < b) {
        const mid = (a + b + 1) >> 1;
        const first = (await file.batch(mid)).ion[0];
        if (first < lo) a = mid; else b = mid - 1;
      }
      start = a;
    }
    let currentIon = -1;
    let k = 0;
    for (let i = start; i < file.batchCount; i++) {
      const batch = await file.batch(i);
      const ion = batch.ion;
      if (ion.length > 0 && ion[0] > hi) break;
      const src = names.map((n) => (batch as unknown as Record<string, Float64Array | Int32Array>)[n]);
      if (every === 1) {
        // Whole runs of one wanted ion are copied in bulk (the common case: all points, or some ions).
        let s = 0;
        for (let r = 1; r <= ion.length; r++) {
          if (r < ion.length && ion[r] === ion[s]) continue;
          if (wanted === null || wanted.has(ion[s])) for (let c = 0; c < cols.length; c++) cols[c].pushRange(src[c], s, r);
          s = r;
        }
        continue;
      }
      for (let r = 0; r < ion.length; r++) {
        if (ion[r] !== currentIon) { currentIon = ion[r]; k = 0; }
        const keep = (wanted === null || wanted.has(currentIon)) && k % every === 0;
        k++;
        if (!keep) continue;
        for (let c = 0; c < cols.length; c++) cols[c].push(src[c][r]);
      }
    }
  } finally {
    await file.close();
  }
  const out: Record<string, unknown> = {};
  names.forEach((n, c) => { out[n] = cols[c].done(); });
  return out as unknown as TrajectoryColumns;
}

/** Contiguous runs of one ion in trajectory columns: [{ ion, start, end }) in order. */
export function ionSegments(ion: Int32Array): { ion: number; start: number; end: number }[] {
  const segs: { ion: number; start: number; end: number }[] = [];
  let s = 0;
  for (let r = 1; r <= ion.length; r++) {
    if (r === ion.length || ion[r] !== ion[s]) { segs.push({ ion: ion[s], start: s, end: r }); s = r; }
  }
  return segs;
}
