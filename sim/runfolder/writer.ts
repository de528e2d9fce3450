// RunFolderWriter: builds a run folder in a temp folder beside DIR and renames it into place at
// finish(), so DIR is either absent, the old folder, or a complete new one — never half written.
// With `force`, the old DIR is swapped out only at that moment. Ion rows and trajectory points are
// streamed to disk batch by batch (see arrowFile.ts).

import { existsSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { folderBeside, swapFolderIntoPlace } from '../core/atomic.js';
import { FATE_NAMES } from '../core/batch.js';
import { makeVector, type Data } from 'apache-arrow';
import { ArrowFileStream } from './arrowFile.js';
import { CsvFileStream } from './csv.js';
import {
  FATES, HISTORY_COLUMNS, ION_COLUMNS, SPECIES_HISTORY_COLUMNS, TRAJECTORY_COLUMNS, type SpeciesHistoryColumns,
  type ColumnSpec, type HistoryColumnsInput, type IonColumnsInput, type TrajectoryColumnsInput,
} from './columns.js';
import { RunFolderError } from './errors.js';
import { formatSummary, type RunSummary } from './summary.js';

export interface RunFolderWriterOptions {
  /** Replace an existing DIR (at finish). */
  force?: boolean;
  /** Also write ions.csv, trajectories.csv (and history.csv). */
  csv?: boolean;
}

export const FILES = {
  summary: 'summary.json',
  ions: 'ions.arrow',
  trajectories: 'trajectories.arrow',
  history: 'history.arrow',
  speciesHistory: 'history_species.arrow',
  ionsCsv: 'ions.csv',
  trajectoriesCsv: 'trajectories.csv',
  historyCsv: 'history.csv',
  speciesHistoryCsv: 'history_species.csv',
} as const;

interface Table {
  arrow: ArrowFileStream;
  csv: CsvFileStream | null;
}

export class RunFolderWriter {
  private ions: Table;
  private trajectories: Table | null = null;
  private history = false;
  /** Tables beside the run-folder ones (a shard part's per-batch sums), closed by finish(). */
  private extras: ArrowFileStream[] = [];
  private lastIon = -1;
  private lastTrajectoryIon = -1;
  private done = false;

  private constructor(
    readonly dir: string, readonly tempDir: string, private readonly options: RunFolderWriterOptions,
  ) {
    this.ions = this.openTable(FILES.ions, FILES.ionsCsv, ION_COLUMNS, 'ions');
  }

  /** Start a run folder at `dir`; refuses an existing `dir` unless `force`. */
  static async create(dir: string, options: RunFolderWriterOptions = {}): Promise<RunFolderWriter> {
    const target = resolve(dir);
    const parent = dirname(target);
    if (!existsSync(parent)) throw new RunFolderError(`${dir}: parent folder ${parent} does not exist`);
    if (!statSync(parent).isDirectory()) throw new RunFolderError(`${dir}: ${parent} is a file, not a folder`);
    if (existsSync(target) && !options.force) {
      throw new RunFolderError(`${dir}: already exists (give --force to replace it)`);
    }
    const temp = folderBeside(target);
    try {
      return new RunFolderWriter(target, temp, options);
    } catch (err) {
      rmSync(temp, { recursive: true, force: true });
      throw err;
    }
  }

  private openTable(file: string, csvFile: string, specs: readonly ColumnSpec[], table: string): Table {
    return {
      arrow: new ArrowFileStream(join(this.tempDir, file), specs, table),
      csv: this.options.csv ? new CsvFileStream(join(this.tempDir, csvFile), specs) : null,
    };
  }

  private live(): void {
    if (this.done) throw new RunFolderError(`${this.dir}: run folder already finished or aborted`);
  }

  /** Number of ion rows written so far. */
  get ionRows(): number { return this.ions.arrow.rows; }
  /** Number of trajectory points written so far. */
  get trajectoryRows(): number { return this.trajectories?.arrow.rows ?? 0; }

  /** One batch of ion rows; ions strictly increasing across all batches. Fate as names or Fate codes. */
  appendIons(cols: IonColumnsInput): void {
    this.live();
    const fate = fateNames(cols.fate);
    const ion = cols.ion;
    for (let k = 0; k < ion.length; k++) {
      if (!(ion[k] > this.lastIon)) {
        throw new RunFolderError(`${FILES.ions}: ion ${ion[k]} written after ion ${this.lastIon} (rows must be in ion order)`);
      }
      this.lastIon = ion[k];
    }
    const entry_rf_phase = cols.entry_rf_phase ?? new Float64Array(ion.length).fill(NaN);
    const row = { ...cols, fate, entry_rf_phase } as unknown as Record<string, ArrayLike<unknown>>;
    this.ions.arrow.append(row);
    this.ions.csv?.append(row);
  }

  /**
   * One record batch of ion rows as read from another ions.arrow (columnBatches), passed on
   * unchanged; ions strictly increasing across all batches. The caller checks the fates
   * (fateCodes). With CSV output the rows are decoded for the CSV file.
   */
  appendIonData(columns: readonly Data[], rows: number): void {
    this.live();
    const ion = intColumn(columns[ION_COLUMNS.findIndex((c) => c.name === 'ion')]);
    for (let k = 0; k < rows; k++) {
      if (!(ion[k] > this.lastIon)) {
        throw new RunFolderError(`${FILES.ions}: ion ${ion[k]} written after ion ${this.lastIon} (rows must be in ion order)`);
      }
      this.lastIon = ion[k];
    }
    this.ions.arrow.appendData(columns, rows);
    this.ions.csv?.append(decoded(ION_COLUMNS, columns));
  }

  /** One record batch of trajectory points as read from another trajectories.arrow, passed on unchanged. */
  appendTrajectoryData(columns: readonly Data[], rows: number): void {
    this.live();
    const ion = intColumn(columns[TRAJECTORY_COLUMNS.findIndex((c) => c.name === 'ion')]);
    for (let k = 0; k < rows; k++) {
      if (ion[k] < this.lastTrajectoryIon) {
        throw new RunFolderError(`${FILES.trajectories}: points of ion ${ion[k]} after ion ${this.lastTrajectoryIon} (ions must be in index order)`);
      }
      this.lastTrajectoryIon = ion[k];
    }
    this.trajectories ??= this.openTable(FILES.trajectories, FILES.trajectoriesCsv, TRAJECTORY_COLUMNS, 'trajectories');
    this.trajectories.arrow.appendData(columns, rows);
    this.trajectories.csv?.append(decoded(TRAJECTORY_COLUMNS, columns));
  }

  /** One record batch of trajectory points; ion non-decreasing across all batches. */
  appendTrajectory(cols: TrajectoryColumnsInput): void {
    this.live();
    const ion = cols.ion;
    for (let k = 0; k < ion.length; k++) {
      if (ion[k] < this.lastTrajectoryIon) {
        throw new RunFolderError(`${FILES.trajectories}: points of ion ${ion[k]} after ion ${this.lastTrajectoryIon} (ions must be in index order)`);
      }
      this.lastTrajectoryIon = ion[k];
    }
    this.trajectories ??= this.openTable(FILES.trajectories, FILES.trajectoriesCsv, TRAJECTORY_COLUMNS, 'trajectories');
    const row = cols as unknown as Record<string, ArrayLike<unknown>>;
    this.trajectories.arrow.append(row);
    this.trajectories.csv?.append(row);
  }

  /** The whole ensemble history at once (it is small: one row per sample time). */
  writeHistory(cols: HistoryColumnsInput): void {
    this.live();
    if (this.history) throw new RunFolderError(`${FILES.history}: written twice`);
    this.history = true;
    this.writeWhole(FILES.history, FILES.historyCsv, HISTORY_COLUMNS, 'history', cols);
  }

  /** The ensemble history per population (runs of several populations), whole. */
  writeSpeciesHistory(cols: SpeciesHistoryColumns): void {
    this.live();
    this.writeWhole(FILES.speciesHistory, FILES.speciesHistoryCsv, SPECIES_HISTORY_COLUMNS, 'species history', cols);
  }

  /** A table written in one piece and closed. */
  private writeWhole(file: string, csvFile: string, specs: readonly ColumnSpec[], table: string, cols: object): void {
    const t = this.openTable(file, csvFile, specs, table);
    const row = cols as unknown as Record<string, ArrayLike<unknown>>;
    try {
      t.arrow.append(row);
      t.csv?.append(row);
    } finally {
      t.arrow.finish();
      t.csv?.close();
    }
  }

  /** A further Arrow table in the folder, streamed like the others (a shard part's own files). */
  extraTable(file: string, specs: readonly ColumnSpec[], table: string): ArrowFileStream {
    this.live();
    const t = new ArrowFileStream(join(this.tempDir, file), specs, table);
    this.extras.push(t);
    return t;
  }

  /** A further small file, written as the folder goes into place (a shard part's manifest). */
  extraFile(file: string, text: string): void {
    this.live();
    this.extraText.push([file, text]);
  }
  private extraText: [string, string][] = [];

  /** Write summary.json, close the tables and put the folder in place at `dir`. */
  async finish(summary: RunSummary): Promise<void> {
    this.live();
    this.done = true;
    try {
      for (const t of [this.ions, this.trajectories]) {
        if (t === null) continue;
        t.arrow.finish();
        t.csv?.close();
      }
      for (const t of this.extras) t.finish();
      for (const [file, text] of this.extraText) writeFileSync(join(this.tempDir, file), text);
      writeFileSync(join(this.tempDir, FILES.summary), formatSummary(summary));
      if (!swapFolderIntoPlace(this.tempDir, this.dir, this.options.force ?? false)) {
        throw new RunFolderError(`${this.dir}: already exists (give --force to replace it)`);
      }
    } catch (err) {
      this.removeTemp();
      if (err instanceof RunFolderError) throw err;
      throw new RunFolderError(`${this.dir}: could not write the run folder (${(err as Error).message.split('\n')[0]})`);
    }
  }

  /** Drop everything written so far; an existing `dir` is left untouched. */
  async abort(): Promise<void> {
    if (this.done) return;
    this.done = true;
    for (const t of [this.ions, this.trajectories]) {
      if (t === null) continue;
      t.arrow.discard();
      t.csv?.close();
    }
    for (const t of this.extras) t.discard();
    this.removeTemp();
  }

  private removeTemp(): void {
    rmSync(this.tempDir, { recursive: true, force: true });
  }
}

/** The values of an Int32 column's Data (a view, offset applied). */
export function intColumn(d: Data): Int32Array {
  return (d.values as Int32Array).subarray(d.offset, d.offset + d.length);
}

/** Columns of Data as the CSV writer takes them (only when CSV output is asked for). */
function decoded(specs: readonly ColumnSpec[], columns: readonly Data[]): Record<string, ArrayLike<unknown>> {
  const out: Record<string, ArrayLike<unknown>> = {};
  specs.forEach((spec, k) => { out[spec.name] = makeVector(columns[k]).toArray() as ArrayLike<unknown>; });
  return out;
}

function fateNames(fate: ArrayLike<string> | Int8Array): string[] {
  const out = new Array<string>(fate.length);
  for (let k = 0; k < fate.length; k++) {
    const f = fate[k];
    const name = typeof f === 'number' ? FATE_NAMES[f] : f;
    if (name === undefined || !(FATES as readonly string[]).includes(name)) {
      throw new RunFolderError(`${FILES.ions}: fate '${String(f)}' is not one of ${FATES.join(', ')}`);
    }
    out[k] = name;
  }
  return out;
}
