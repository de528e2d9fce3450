// Every value a scene file gives, as written (with the unit the user wrote) and resolved to SI, for
// the inputs table of a report. Walks the YAML document (after --set overrides) beside the scene
// schema, so each stage kind's keys come from its own entry (sim/stages/<kind>/index.ts) and a new
// key appears here without a change.

import { LineCounter, parseDocument, isMap, isScalar, isSeq, type Document, type Node } from 'yaml';
import { parseQuantity, DIMENSION_INFO, type Dimension } from '../units/quantity.js';
import type { Field } from './schema.js';
import { SCENE_SCHEMA, applyOverrides } from './load.js';

export interface InputRow {
  /** Key path as in the scene file, e.g. "stages.0.rf.amplitude". */
  key: string;
  /** The block it belongs to: "scene", "stage 0 (trap)", "ions 1 (m/z 150)", "gas", "run", "targets". */
  block: string;
  /** Key inside the block, e.g. "rf.amplitude". */
  name: string;
  /** The value as written in the scene file (or by --set), unit included. */
  written: string;
  /** SI value for a quantity (energies in eV), else null. */
  si: number | null;
  /** SI unit of the quantity ('' for plain numbers and text). */
  unit: string;
  /** Physical dimension of a quantity, else null. */
  dim: Dimension | null;
  /** True when --set gave the value. */
  overridden: boolean;
  /** True for a value the scene leaves out and the loader fills in (written is then the resolved value). */
  default?: boolean;
}

function blockOf(path: (string | number)[], doc: Document): { block: string; rest: (string | number)[] } {
  const [top, i, ...rest] = path;
  if (top === 'stages' && typeof i === 'number') {
    const type = doc.getIn(['stages', i, 'type']);
    return { block: `stage ${i}${type !== undefined ? ` (${String(type)})` : ''}`, rest };
  }
  if (top === 'ions' && typeof i === 'number') {
    const mz = doc.getIn(['ions', i, 'mz']);
    return { block: `ions ${i}${mz !== undefined ? ` (m/z ${String(mz)})` : ''}`, rest };
  }
  if (path.length === 1) return { block: 'scene', rest: path };
  return { block: String(top), rest: path.slice(1) };
}

function fieldFor(f: Field, node: Node): Record<string, Field> | null {
  if (f.kind === 'object') return f.fields;
  if (f.kind === 'tagged' && isMap(node)) {
    const v = f.variants[String(node.get(f.tag))];
    return v ? { [f.tag]: { kind: 'string' }, ...v.fields } : null;
  }
  return null;
}

function walk(node: Node, f: Field, path: (string | number)[], doc: Document, overridden: Set<string>, out: InputRow[]): void {
  if (f.kind === 'list') {
    if (isSeq(node)) node.items.forEach((item, i) => walk(item as Node, f.item, [...path, i], doc, overridden, out));
    return;
  }
  const fields = fieldFor(f, node);
  if (fields) {
    if (!isMap(node)) return;
    for (const pair of node.items) {
      const key = isScalar(pair.key) ? String(pair.key.value) : String(pair.key);
      const sub = fields[key];
      if (sub && pair.value) walk(pair.value as Node, sub, [...path, key], doc, overridden, out);
    }
    return;
  }
  if (!isScalar(node)) return;
  const written = String(node.value);
  const { block, rest } = blockOf(path, doc);
  let si: number | null = null, unit = '', dim: Dimension | null = null;
  const asQuantity = (d: Dimension) => {
    try { si = parseQuantity(node.value as string | number, d, 'value'); unit = DIMENSION_INFO[d].si; dim = d; } catch { /* validated before: not a quantity */ }
  };
  if (f.kind === 'quantity') asQuantity(f.dim);
  else if (f.kind === 'enumOrQuantity' && !f.values.includes(written)) asQuantity(f.dim);
  else if (f.kind === 'number' && typeof node.value === 'number') si = node.value;
  const key = path.join('.');
  out.push({ key, block, name: rest.join('.'), written, si, unit, dim, overridden: overridden.has(key) });
}

/** The rows of a scene text that parseScene accepted (same overrides). */
export function sceneInputRows(text: string, file: string, set: string[] = []): InputRow[] {
  const lines = new LineCounter();
  const doc = parseDocument(text, { lineCounter: lines, prettyErrors: false });
  const origin = { file, lines, overridden: new Set<string>() };
  applyOverrides(doc, set, origin);
  const out: InputRow[] = [];
  if (doc.contents) walk(doc.contents as Node, SCENE_SCHEMA, [], doc, origin.overridden, out);
  return out;
}
