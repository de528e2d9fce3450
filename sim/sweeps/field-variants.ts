// Geometry variants of a field solve: `--vary KEY=a,b,c` (values in the key's units) or
// `KEY=A..B:N` (as for sweeps), several --vary giving every combination, first key slowest. Each
// variant is one scene (the base scene with --set overrides) solved into its own folder
// DIR/variant-K, so `--shard I/N` takes a contiguous range of variants — one per task when N is
// the number of variants — and the shards write the same folders one machine would. variants.json
// (the plan: every variant's folder and values) is the same bytes from every shard.

import { parse as parseYaml } from 'yaml';
import { DIMENSION_INFO, parseQuantity, QuantityError } from '../units/quantity.js';
import { sliceRange, type ShardSpec } from '../runs/shard.js';
import { fieldAt, parseVary, SweepError } from './vary.js';

export interface VariantAxis {
  key: string;
  /** SI values (the key's SI unit; plain numbers for dimensionless keys). */
  values: number[];
  unit: string;
  /** The --set override that puts value v into the scene. */
  set: (v: number) => string;
}

export interface FieldVariant {
  index: number;
  /** Folder name inside DIR: variant-K, zero-padded to the width of the last index. */
  folder: string;
  /** One value per axis, SI. */
  values: number[];
  set: string[];
}

export interface VariantPlan { axes: VariantAxis[]; variants: FieldVariant[] }

/** Most variants one solve may have: each is a whole field solve (a design choice, no source). */
export const MAX_VARIANTS = 1000;

const LIST = /^([^=]+)=(.+)$/;

/** One --vary of a field solve against the scene text (the key's kind and unit come from the schema). */
export function parseVariantAxis(spec: string, sceneText: string, file: string): VariantAxis {
  if (/\.\..+:\d+\s*$/.test(spec)) {
    const a = parseVary(spec, sceneText, file);
    if (a.key === 'mz') throw new SweepError('--vary mz: a field solve does not depend on the ions; vary a key of an electrodes stage');
    return { key: a.key, values: a.values, unit: a.unit, set: (v) => a.overrides(v)[0] };
  }
  const m = LIST.exec(spec.trim());
  if (!m) throw new SweepError(`--vary expects KEY=a,b,c such as stages.0.grid.spacing=0.25mm,0.2mm (or KEY=A..B:N), got '${spec}'`);
  const key = m[1].trim();
  const texts = m[2].split(',').map((t) => t.trim());
  if (texts.length < 2 || texts.some((t) => t === '')) throw new SweepError(`--vary ${key}: give at least two comma-separated values, got '${m[2]}'`);
  let raw: Record<string, unknown> = {};
  try { raw = (parseYaml(sceneText) as Record<string, unknown>) ?? {}; } catch { /* the loader reports YAML errors with their line */ }
  const field = fieldAt(key, raw, file);
  if (field.kind !== 'quantity' && field.kind !== 'number') {
    throw new SweepError(`--vary ${key}: not a numeric key (it takes ${field.kind === 'object' ? 'a block' : `a ${field.kind}`})`);
  }
  const dim = field.kind === 'quantity' ? field.dim : 'dimensionless';
  const unit = field.kind === 'quantity' ? DIMENSION_INFO[field.dim].si : '';
  const values = texts.map((t) => {
    try {
      return parseQuantity(t, dim, `--vary ${key}`);
    } catch (e) {
      if (e instanceof QuantityError) throw new SweepError(e.message);
      throw e;
    }
  });
  const seen = new Set<number>();
  for (let k = 0; k < values.length; k++) {
    if (seen.has(values[k])) throw new SweepError(`--vary ${key}: the value ${texts[k]} is given twice (each variant once)`);
    seen.add(values[k]);
  }
  return { key, values, unit, set: (v) => `${key}=${unit !== '' ? `${v} ${unit}` : String(v)}` };
}

/** Every combination of the axes' values, first axis slowest. */
export function planVariants(axes: VariantAxis[]): VariantPlan {
  const keys = new Set<string>();
  for (const a of axes) {
    if (keys.has(a.key)) throw new SweepError(`--vary ${a.key}: the key is varied twice`);
    keys.add(a.key);
  }
  const count = axes.reduce((n, a) => n * a.values.length, 1);
  if (count > MAX_VARIANTS) throw new SweepError(`--vary: ${count} variants exceed ${MAX_VARIANTS} field solves; vary fewer values`);
  const width = String(count - 1).length;
  const variants: FieldVariant[] = [];
  for (let index = 0; index < count; index++) {
    let rest = index;
    const values = new Array<number>(axes.length);
    for (let j = axes.length - 1; j >= 0; j--) {
      values[j] = axes[j].values[rest % axes[j].values.length];
      rest = Math.floor(rest / axes[j].values.length);
    }
    variants.push({ index, folder: `variant-${String(index).padStart(width, '0')}`, values, set: values.map((v, j) => axes[j].set(v)) });
  }
  return { axes, variants };
}

/** The variants of shard I of N (a contiguous range; all of them without a shard). */
export function variantsOf(plan: VariantPlan, shard: ShardSpec | undefined): FieldVariant[] {
  if (!shard) return plan.variants;
  const [from, to] = sliceRange(shard, plan.variants.length, `the solve has ${plan.variants.length} geometry variants and a shard solves whole variants`);
  return plan.variants.slice(from, to);
}

/** variants.json: the plan, written alike by every shard (no times, no shard). */
export function variantsJson(plan: VariantPlan, sceneFile: string): string {
  return JSON.stringify({
    scene_file: sceneFile,
    keys: plan.axes.map((a) => ({ key: a.key, unit: a.unit, values: a.values })),
    variants: plan.variants.map((v) => ({ folder: v.folder, values: Object.fromEntries(plan.axes.map((a, j) => [a.key, v.values[j]])) })),
  }, null, 2) + '\n';
}
