// The guard rails every command that runs a scene shares: --max-output, the estimate line on stderr
// before the run, and the exit code of a run stopped by SIGINT or SIGTERM.

import type { ParsedArgs } from './args.js';
import { flag } from './args.js';
import { DEFAULT_MAX_OUTPUT, estimateLine, formatBytes, parseByteSize, type RunEstimate } from '../sim/runs/estimate.js';
export { interruptedExitCode } from '../sim/runs/stop-signals.js';

/** Help lines of --max-output, the descriptions starting at column `col`. */
export function maxOutputHelp(col = 21): string {
  const pad = ' '.repeat(col);
  return `${'  --max-output SIZE'.padEnd(col)}allow a run whose estimated output exceeds ${formatBytes(DEFAULT_MAX_OUTPUT)} (e.g. 20GB,\n`
    + `${pad}500MB, 2GiB); the estimate (an upper bound) is printed to stderr before the run`;
}

/** The --max-output value in bytes (the default limit when absent). */
export function maxOutput(a: ParsedArgs): number {
  const v = flag(a, 'max-output');
  return v === undefined ? DEFAULT_MAX_OUTPUT : parseByteSize(v);
}

/** Prints the estimate line to stderr, prefixed with a label (e.g. the demo's scene). */
export function printEstimate(label = ''): (e: RunEstimate, workers: number) => void {
  return (e, workers) => process.stderr.write(`${label}${estimateLine(e, workers)}\n`);
}
