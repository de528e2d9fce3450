// A render request that cannot be carried out as asked (bad camera name, missing output folder,
// unknown extension). One-line message; the CLI prints it and exits 2 (cli/errors.ts reads exitCode).

export class RenderError extends Error {
  override name = 'RenderError';
  readonly exitCode = 2;
}
