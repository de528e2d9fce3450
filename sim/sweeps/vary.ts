// Sweep axes: "KEY=A..B:N" → N evenly spaced values from A to B, A below B. KEY is `mz` (the m/z of every ion
// population) or any scalar key of the scene file (stages.0.dc, stages.0.rf.amplitude,
// ions.0.energy, ...) with A and B in that key's units ("95V..105V:11"). The key's kind and unit
// come from the scene schema, so a wrong unit is caught before anything runs. A reversed range
// (B below A) is refused rather than sorted: the CSV rows and the peak figures (widths are
// high − low) then always run upward, and the user sees the range written the way it is read.

import { parse as parseYaml } from 'yaml';
import { SCENE_SCHEMA } from '../scene/load.js';
import type { Field } from '../scene/schema.js';
import { DIMENSION_INFO, parseQuantity, QuantityError, type Dimension } from '../units/quantity.js';

/** A bad sweep request; one line, exit 2 (the CLI treats exitCode 2 as a user error). */
export class SweepError extends Error {
  override name = 'SweepError';
  readonly exitCode = 2;
}

export interface SweepAxis {
  /** As given, e.g. "mz", "stages.0.dc" (the CSV column name). */
  key: string;
  /** Values in SI (energies eV; m/z in u/e), A to B inclusive. */
  values: number[];
  /** SI unit of the values ('' for plain numbers, 'Th' for m/z). */
  unit: string;
  /** --set overrides that put value v into the scene. */
  overrides: (v: number) => string[];
}

/**
 * Most points one sweep may have (all axes and scan lines together): a 500 × 200 map, or a curve
 * at 0.001 Th steps over 100 Th. A sweep of 10⁶ points at a few thousand ions each runs for days;
 * split it into several sweeps instead (a design choice, no source).
 */
export const MAX_POINTS = 100_000;

const SPEC = /^([^=]+)=(.+?)\.\.(.+?):(\d+)$/;

/**
 * Parse one --vary value against the scene text (for the key's kind and unit and, for `mz`, the
 * number of populations).
 */
export function parseVary(spec: string, sceneText: string, file: string): SweepAxis {
  const m = SPEC.exec(spec.trim());
  if (!m) throw new SweepError(`--vary expects KEY=A..B:N such as mz=480..520:201 or stages.0.dc=95V..105V:11, got '${spec}'`);
  const key = m[1].trim(), aText = m[2].trim(), bText = m[3].trim();
  const n = Number(m[4]);
  if (!(n >= 2)) throw new SweepError(`--vary ${key}: N must be at least 2, got ${m[4]}`);
  if (n > MAX_POINTS) throw new SweepError(`--vary ${key}: N = ${n} exceeds ${MAX_POINTS} points per sweep; split the range into several sweeps`);
  const raw = readRaw(sceneText, file);
  if (key === 'mz') {
    const a = plainNumber(aText, key), b = plainNumber(bText, key);
    if (!(a > 0 && b > 0)) throw new SweepError(`--vary mz: m/z values must be positive, got ${aText}..${bText}`);
    const pops = Array.isArray(raw.ions) ? raw.ions.length : 0;
    if (pops === 0) throw new SweepError(`--vary mz: ${file} has no ion populations`);
    ascending(key, a, b, aText, bText, n);
    return { key, values: grid(a, b, n), unit: 'Th', overrides: (v) => Array.from({ length: pops }, (_, k) => `ions.${k}.mz=${v}`) };
  }
  const field = fieldAt(key, raw, file);
  let a: number, b: number, unit: string, kind: 'quantity' | 'number';
  if (field.kind === 'quantity') {
    a = quantity(aText, field.dim, key);
    b = quantity(bText, field.dim, key);
    unit = DIMENSION_INFO[field.dim].si;
    kind = 'quantity';
  } else if (field.kind === 'number') {
    a = plainNumber(aText, key);
    b = plainNumber(bText, key);
    unit = '';
    kind = 'number';
  } else {
    throw new SweepError(`--vary ${key}: not a numeric key (it takes ${field.kind === 'object' ? 'a block' : `a ${field.kind}`})`);
  }
  ascending(key, a, b, aText, bText, n);
  const values = grid(a, b, n);
  return {
    key, values, unit,
    overrides: (v) => [`${key}=${kind === 'quantity' && unit !== '' ? `${v} ${unit}` : String(v)}`],
  };
}

/** A below B, or a SweepError naming the range the way it would be accepted. */
function ascending(key: string, a: number, b: number, aText: string, bText: string, n: number): void {
  if (a < b) return;
  if (a === b) throw new SweepError(`--vary ${key}: A and B are the same value (${aText}); give a range A..B with A below B`);
  throw new SweepError(`--vary ${key}: the range runs downward (${aText}..${bText}); give it as A..B with A below B: ${key}=${bText}..${aText}:${n}`);
}

/** N values from a to b; 12 significant digits so that 480 + 0.2·k prints as 480.2, not 480.20000000000005. */
export function grid(a: number, b: number, n: number): number[] {
  const out: number[] = [];
  for (let i = 0; i < n; i++) out.push(i === n - 1 ? b : Number((a + ((b - a) * i) / (n - 1)).toPrecision(12)));
  return out;
}

function plainNumber(text: string, key: string): number {
  try {
    return parseQuantity(text, 'dimensionless', `--vary ${key}`);
  } catch (e) {
    if (e instanceof QuantityError) throw new SweepError(e.message);
    throw e;
  }
}

function quantity(text: string, dim: Dimension, key: string): number {
  try {
    return parseQuantity(text, dim, `--vary ${key}`);
  } catch (e) {
    if (e instanceof QuantityError) throw new SweepError(e.message);
    throw e;
  }
}

function readRaw(text: string, file: string): Record<string, any> {
  try {
    const v = parseYaml(text) as unknown;
    return v !== null && typeof v === 'object' ? (v as Record<string, any>) : {};
  } catch {
    return {}; // the scene loader reports YAML errors with their line
  }
}

/** The schema field of a dotted key, following list indices and stage types in the scene. */
export function fieldAt(key: string, raw: Record<string, any>, file: string): Field {
  const parts = key.split('.');
  let f: Field = SCENE_SCHEMA;
  let node: any = raw;
  const unknown = (i: number) => new SweepError(`--vary ${key}: unknown key '${parts.slice(0, i + 1).join('.')}' in ${file}`);
  for (let i = 0; i < parts.length; i++) {
    const p = parts[i];
    // A one-key mapping (a shape such as `circle: { radius: 2 mm }`): the key names the variant.
    if (f.kind === 'choice') {
      const variant = f.variants[p];
      if (!variant || node?.[p] === undefined) throw unknown(i);
      f = { kind: 'object', fields: variant.fields, required: variant.required };
      node = node[p];
      continue;
    }
    if (f.kind === 'list') {
      if (!/^\d+$/.test(p) || !Array.isArray(node) || Number(p) >= node.length) {
        throw new SweepError(`--vary ${key}: no entry ${p} in ${parts.slice(0, i).join('.')} of ${file}`);
      }
      node = node[Number(p)];
      f = f.item;
      if (f.kind === 'tagged') {
        const tag = node?.[f.tag];
        const variant = typeof tag === 'string' ? f.variants[tag] : undefined;
        if (!variant) throw new SweepError(`--vary ${key}: entry ${parts.slice(0, i + 1).join('.')} has no known ${f.tag}`);
        f = { kind: 'object', fields: variant.fields, required: variant.required };
      }
      continue;
    }
    if (f.kind !== 'object' || !(p in f.fields)) throw unknown(i);
    f = f.fields[p];
    node = node?.[p];
    if (f.kind === 'tagged') {
      const tag = node?.[f.tag];
      const variant = typeof tag === 'string' ? f.variants[tag] : undefined;
      if (!variant) throw unknown(i);
      f = { kind: 'object', fields: variant.fields, required: variant.required };
    }
  }
  return f;
}
