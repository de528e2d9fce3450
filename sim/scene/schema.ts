// The scene-file schema: which keys exist, what each expects, and a validator that reports the
// first problem with file, line, key path and expected unit in one line.

import { isMap, isScalar, isSeq, LineCounter, type Document, type Node } from 'yaml';
import { parseQuantity, QuantityError, DIMENSION_INFO, type Dimension } from '../units/quantity.js';
import { closest } from '../core/closest.js';

export class SceneError extends Error {
  override name = 'SceneError';
}

export type Field =
  | { kind: 'quantity'; dim: Dimension; positive?: boolean; nonNegative?: boolean; doc?: string }
  | { kind: 'number'; positive?: boolean; nonNegative?: boolean; integer?: boolean; min?: number; max?: number }
  | { kind: 'string' }
  | { kind: 'enum'; values: readonly string[] }
  | { kind: 'enumOrQuantity'; values: readonly string[]; dim: Dimension }
  | { kind: 'object'; fields: Record<string, Field>; required?: readonly string[] }
  | { kind: 'list'; item: Field; minItems?: number }
  | { kind: 'tagged'; tag: string; variants: Record<string, { fields: Record<string, Field>; required?: readonly string[] }> }
  /** A mapping with exactly one key naming the variant, e.g. `circle: { radius: 2 mm }`; returns { kind, ...value }. */
  | { kind: 'choice'; variants: Record<string, { fields: Record<string, Field>; required?: readonly string[] }> };

/** Where a value came from, for messages: a file position or a --set override. */
export interface Origin {
  file: string;
  lines: LineCounter;
  /** Key paths set on the command line, so their errors say "--set" instead of a line number. */
  overridden: Set<string>;
}

type Path = (string | number)[];

function pathText(path: Path): string {
  return path.length === 0 ? '(top level)' : path.join('.');
}

function where(origin: Origin, node: Node | null | undefined, path: Path): string {
  const key = pathText(path);
  if (origin.overridden.has(key)) return `--set ${key}`;
  const range = (node as { range?: [number, number, number] } | null | undefined)?.range;
  if (range) {
    const { line } = origin.lines.linePos(range[0]);
    return `${origin.file}:${line}: ${key}`;
  }
  return `${origin.file}: ${key}`;
}

export function fail(origin: Origin, node: Node | null | undefined, path: Path, msg: string): never {
  throw new SceneError(`${where(origin, node, path)}: ${msg}`);
}

function expectText(f: Field): string {
  switch (f.kind) {
    case 'quantity': return `${/^[aeiou]/.test(f.dim) ? 'an' : 'a'} ${f.dim} such as ${DIMENSION_INFO[f.dim].example}`;
    case 'number': return f.integer ? 'a whole number' : 'a number';
    case 'string': return 'text';
    case 'enum': return `one of ${f.values.join(', ')}`;
    case 'enumOrQuantity': return `${f.values.join(' or ')}, or ${/^[aeiou]/.test(f.dim) ? 'an' : 'a'} ${f.dim} such as ${DIMENSION_INFO[f.dim].example}`;
    case 'object': case 'tagged': return 'a mapping of keys';
    case 'choice': return `one of ${Object.keys(f.variants).join(', ')}`;
    case 'list': return 'a list';
  }
}

const closestKey = closest;

/**
 * Validate a YAML node against a field and return plain values with quantities converted to SI
 * (energies in eV). Unknown keys are errors with a "did you mean" hint.
 */
export function validate(node: Node | null | undefined, f: Field, path: Path, origin: Origin): unknown {
  if (node === null || node === undefined || (isScalar(node) && node.value === null)) {
    fail(origin, node, path, `expects ${expectText(f)}, got nothing`);
  }
  switch (f.kind) {
    case 'quantity': {
      if (!isScalar(node)) fail(origin, node, path, `expects ${expectText(f)}`);
      let v: number;
      try {
        v = parseQuantity(node.value as string | number, f.dim, 'value');
      } catch (e) {
        if (e instanceof QuantityError) {
          const raw = String(node.value);
          const why = /no unit|give the unit/.test(e.message) ? ' (no unit)' : /unknown unit '([^']*)'/.exec(e.message)?.[0];
          fail(origin, node, path, `expects ${expectText(f)}, got '${raw}'${why && why.startsWith(' ') ? why : why ? ` (${why})` : ''}`);
        }
        throw e;
      }
      if (f.positive && !(v > 0)) fail(origin, node, path, `must be greater than zero (${expectText(f)}), got '${node.value}'`);
      if (f.nonNegative && !(v >= 0)) fail(origin, node, path, `must not be negative (${expectText(f)}), got '${node.value}'`);
      return v;
    }
    case 'number': {
      if (!isScalar(node) || typeof node.value !== 'number' || !Number.isFinite(node.value)) {
        fail(origin, node, path, `expects ${expectText(f)}, got '${isScalar(node) ? String(node.value) : '(mapping or list)'}'`);
      }
      const v = node.value;
      if (f.integer && !Number.isInteger(v)) fail(origin, node, path, `expects a whole number, got '${v}'`);
      if (f.positive && !(v > 0)) fail(origin, node, path, `must be greater than zero, got '${v}'`);
      if (f.nonNegative && !(v >= 0)) fail(origin, node, path, `must not be negative, got '${v}'`);
      if (f.min !== undefined && v < f.min) fail(origin, node, path, `must be at least ${f.min}, got '${v}'`);
      if (f.max !== undefined && v > f.max) fail(origin, node, path, `must be at most ${f.max}, got '${v}'`);
      return v;
    }
    case 'string': {
      if (!isScalar(node)) fail(origin, node, path, 'expects text');
      return String(node.value);
    }
    case 'enum': {
      if (!isScalar(node) || !f.values.includes(String(node.value))) {
        const got = isScalar(node) ? String(node.value) : '(mapping or list)';
        const hint = closestKey(got, [...f.values]);
        fail(origin, node, path, `expects ${expectText(f)}, got '${got}'${hint ? ` (did you mean '${hint}'?)` : ''}`);
      }
      return String(node.value);
    }
    case 'enumOrQuantity': {
      if (isScalar(node) && f.values.includes(String(node.value))) return String(node.value);
      return validate(node, { kind: 'quantity', dim: f.dim }, path, origin);
    }
    case 'list': {
      if (!isSeq(node)) fail(origin, node, path, `expects ${expectText(f)}`);
      if (f.minItems && node.items.length < f.minItems) fail(origin, node, path, `needs at least ${f.minItems} entr${f.minItems === 1 ? 'y' : 'ies'}`);
      return node.items.map((item, i) => validate(item as Node, f.item, [...path, i], origin));
    }
    case 'object':
      return validateObject(node, f.fields, f.required ?? [], path, origin);
    case 'tagged': {
      if (!isMap(node)) fail(origin, node, path, `expects ${expectText(f)}`);
      const tagNode = node.get(f.tag, true) as Node | undefined;
      const names = Object.keys(f.variants);
      if (!tagNode || !isScalar(tagNode)) fail(origin, node, [...path, f.tag], `is required: one of ${names.join(', ')}`);
      const tag = String(tagNode.value);
      const variant = f.variants[tag];
      if (!variant) {
        const hint = closestKey(tag, names);
        fail(origin, tagNode, [...path, f.tag], `expects one of ${names.join(', ')}, got '${tag}'${hint ? ` (did you mean '${hint}'?)` : ''}`);
      }
      const out = validateObject(node, { [f.tag]: { kind: 'string' }, ...variant.fields }, variant.required ?? [], path, origin);
      return out;
    }
    case 'choice': {
      const names = Object.keys(f.variants);
      if (!isMap(node) || node.items.length !== 1) fail(origin, node, path, `expects one key: ${expectText(f)}`);
      const pair = node.items[0];
      const keyNode = pair.key as Node;
      const name = isScalar(keyNode) ? String(keyNode.value) : String(keyNode);
      const variant = f.variants[name];
      if (!variant) {
        const hint = closestKey(name, names);
        fail(origin, keyNode, [...path, name], `expects ${expectText(f)}${hint ? ` (did you mean '${hint}'?)` : ''}`);
      }
      return { kind: name, ...validateObject(pair.value as Node, variant.fields, variant.required ?? [], [...path, name], origin) };
    }
  }
}

function validateObject(node: Node, fields: Record<string, Field>, required: readonly string[], path: Path, origin: Origin): Record<string, unknown> {
  if (!isMap(node)) fail(origin, node, path, 'expects a mapping of keys');
  const out: Record<string, unknown> = {};
  const known = Object.keys(fields);
  for (const pair of node.items) {
    const keyNode = pair.key as Node;
    const key = isScalar(keyNode) ? String(keyNode.value) : String(keyNode);
    const field = fields[key];
    if (!field) {
      const hint = closestKey(key, known);
      fail(origin, keyNode, [...path, key], `unknown key${hint ? ` (did you mean '${hint}'?)` : ''}; expected one of ${known.join(', ')}`);
    }
    out[key] = validate(pair.value as Node, field, [...path, key], origin);
  }
  for (const r of required) {
    if (!(r in out)) {
      const f = fields[r];
      fail(origin, node, [...path, r], `is required (${expectText(f)})`);
    }
  }
  return out;
}

export function yamlDocumentErrors(doc: Document, origin: Origin): void {
  const err = doc.errors[0];
  if (err) {
    const line = err.linePos?.[0]?.line ?? (err.pos ? origin.lines.linePos(err.pos[0]).line : '?');
    throw new SceneError(`${origin.file}:${line}: not valid YAML: ${err.message.split('\n')[0]}`);
  }
}
