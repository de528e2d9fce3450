// JSON output helpers shared by every file and stdout line the project writes.

/** JSON.stringify replacer: Infinity and NaN have no JSON form, so they are written as null. */
export function finiteOrNull(_key: string, v: unknown): unknown {
  return typeof v === 'number' && !Number.isFinite(v) ? null : v;
}
