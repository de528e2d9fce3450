// "file:line: key" for a key path of a scene file, found after loading (errors a later step
// raises about a key, such as the field solver's FieldInputError for a stage's shape).

import { LineCounter, parseDocument, type Node } from 'yaml';

/** Where key `path` sits in the scene text: "file:line: a.b.c" (the deepest node the path reaches). */
export function keyWhere(text: string, file: string, path: readonly (string | number)[]): string {
  const lines = new LineCounter();
  const doc = parseDocument(text, { lineCounter: lines });
  for (let d = path.length; d > 0; d--) {
    const n = doc.getIn(path.slice(0, d), true) as Node | undefined;
    const range = (n as { range?: [number, number, number] } | undefined)?.range;
    if (n && typeof n === 'object' && range) return `${file}:${lines.linePos(range[0]).line}: ${path.join('.')}`;
  }
  return `${file}: ${path.join('.')}`;
}

/** A dotted key ("electrodes.1.shapes.0") as a path, numbers for list indices. */
export function keyPath(key: string): (string | number)[] {
  return key === '' ? [] : key.split('.').map((p) => (/^\d+$/.test(p) ? Number(p) : p));
}
