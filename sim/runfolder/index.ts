// Run folder: the on-disk result of one `iontrail run` (issue 3, "Run folder"). Readable outside
// the project (Arrow IPC file format: pyarrow.ipc.open_file, arrow::read_ipc_file, Arrow.jl).
//
//   DIR/summary.json        figures of merit + provenance (RunSummary; stable key order)
//   DIR/ions.arrow          one row per ion, in ion order (ION_COLUMNS; SI units, energies eV)
//   DIR/trajectories.arrow  recorded points, each ion's points contiguous, ions in order (optional)
//   DIR/history.arrow       ensemble averages against time, for gas cooling (optional)
//   DIR/*.csv               the same tables as CSV with { csv: true }
//
// Writing:
//   const w = await RunFolderWriter.create(dir, { force, csv }); // refuses an existing dir without force
//   w.appendIons(cols);        // one batch of rows; fate as names or engine Fate codes
//   w.appendTrajectory(cols);  // one record batch, streamed to disk
//   w.writeHistory(cols);      // whole table at once
//   await w.finish(summary);   // summary.json, footers, atomic rename into place
//   await w.abort();           // removes the temp folder, leaves an existing dir untouched
// Reading:
//   const run = await readRunFolder(dir);   // { dir, summary, ions, hasTrajectories, hasHistory }
//   await readTrajectories(dir, { ions: [0, 3], everyNth: 10 });
//   for await (const b of trajectoryBatches(dir)) ...;   // streaming, one record batch at a time
//   readHistory(dir); readSummary(dir); ionSegments(cols.ion); estimateTrajectoryRows(dir);
// Every read/write failure is a RunFolderError (name 'RunFolderError', one-line message with the path).

export { RunFolderError } from './errors.js';
export {
  ION_COLUMNS, TRAJECTORY_COLUMNS, HISTORY_COLUMNS, FATES,
  type ColumnSpec, type FateName, type IonColumns, type IonColumnsInput, type TrajectoryColumns,
  type TrajectoryColumnsInput, type HistoryColumns, type HistoryColumnsInput,
} from './columns.js';
export { formatSummary, type RunSummary, type SpeciesSummary, type RunProvenance } from './summary.js';
export { RunFolderWriter, FILES, type RunFolderWriterOptions } from './writer.js';
export {
  readRunFolder, readSummary, readIons, tableBatches, readHistory, readSpeciesHistory, readTrajectories, trajectoryBatches, ionSegments, estimateTrajectoryRows,
  TrajectoryFile, type RunFolder, type TrajectorySelection,
} from './reader.js';
