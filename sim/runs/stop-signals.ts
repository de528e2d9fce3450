// Ctrl-C (SIGINT) and SIGTERM (sent by `kill`, batch schedulers and container runtimes before they
// kill a job) both stop a run the same way: no new batches or sweep points, the finished ones kept,
// the folder written and marked incomplete. The exit code then says which signal it was, 128 + its
// number as a shell reports a process killed by it (130 for SIGINT, 143 for SIGTERM).

import { constants } from 'node:os';

const SIGNALS = ['SIGINT', 'SIGTERM'] as const;
export type StopSignal = (typeof SIGNALS)[number];

let last: StopSignal | null = null;

/** Call `onStop` on SIGINT or SIGTERM until the returned function removes the handlers. */
export function onStopSignal(onStop: (signal: StopSignal) => void): () => void {
  const handlers = SIGNALS.map((sig) => {
    const h = () => { last = sig; onStop(sig); };
    process.on(sig, h);
    return [sig, h] as const;
  });
  return () => { for (const [sig, h] of handlers) process.off(sig, h); };
}

/** The signal that stopped the latest interrupted run, if any. */
export function lastStopSignal(): StopSignal | null {
  return last;
}

/** Exit code of a run interrupted by `signal` (default the latest one; SIGINT when none was seen). */
export function interruptedExitCode(signal: StopSignal | null = last): number {
  return 128 + constants.signals[signal ?? 'SIGINT'];
}
