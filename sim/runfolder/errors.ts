// A run folder that cannot be read or written as asked. The message is one line naming the path;
// the CLI prints it and exits 2 (cli/errors.ts recognises the name).

export class RunFolderError extends Error {
  override name = 'RunFolderError';
  readonly exitCode = 2;
}
