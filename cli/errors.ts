// Errors the user can fix. Each carries a one-line message; the CLI prints it and exits 2.

export class UsageError extends Error {
  override name = 'UsageError';
  readonly exitCode = 2;
}

/** True for errors whose message is meant for the user (no stack trace). */
export function isUserError(err: unknown): err is Error {
  return err instanceof Error && (err as { exitCode?: number }).exitCode === 2
    || (err instanceof Error && ['UsageError', 'QuantityError', 'SceneError', 'RunFolderError'].includes(err.name));
}
