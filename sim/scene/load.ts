// Scene files: YAML → validated → resolved to SI (types.ts). Every problem is a SceneError with
// one line naming the file, line, key path and the expected unit.

import { readFileSync } from 'node:fs';
import { LineCounter, parseDocument, parse as parseYaml, isMap, isSeq, type Document, type Node } from 'yaml';
import { validate, fail, yamlDocumentErrors, SceneError, type Field, type Origin } from './schema.js';
import type { Scene, Stage, Population, RunSettings, GasSettings } from './types.js';
import { GAS_FIELD } from './fields.js';
import { fastestSecular, HISTORY_STEPS_PER_SECULAR } from './secular.js';
import { STAGE_ENTRIES, firstRf as firstRfOf } from '../stages/registry.js';
import { resolveGas } from './gas.js';
import { TARGETS_FIELD, type Targets } from './targets.js';

// Stage entries come from the stage kinds (sim/stages): their keys, units and resolution.
const stage: Field = {
  kind: 'tagged',
  tag: 'type',
  variants: Object.fromEntries([...STAGE_ENTRIES].map(([name, { entry }]) => [name, { fields: entry.fields, required: entry.required }])),
};

const population: Field = {
  kind: 'object',
  fields: {
    mz: { kind: 'number', positive: true },
    charge: { kind: 'number', integer: true },
    count: { kind: 'number', integer: true, min: 1, max: 100_000_000 },
    position: {
      kind: 'object',
      fields: {
        x: { kind: 'quantity', dim: 'length' }, y: { kind: 'quantity', dim: 'length' }, z: { kind: 'quantity', dim: 'length' },
        spread: { kind: 'quantity', dim: 'length', nonNegative: true },
        spread_z: { kind: 'quantity', dim: 'length', nonNegative: true },
      },
    },
    energy: { kind: 'quantity', dim: 'energy', nonNegative: true },
    energy_spread: { kind: 'quantity', dim: 'energy', nonNegative: true },
    angle_spread: { kind: 'quantity', dim: 'angle', nonNegative: true },
    direction: { kind: 'enum', values: ['axial', 'isotropic'] },
    rf_phase: { kind: 'enumOrQuantity', values: ['uniform'], dim: 'angle' },
  },
  required: ['mz', 'count'],
};

const run: Field = {
  kind: 'object',
  fields: {
    integrator: { kind: 'enum', values: ['rk4', 'dopri5'] },
    steps_per_cycle: { kind: 'number', integer: true, min: 4, max: 100_000 },
    tolerance: { kind: 'number', positive: true, max: 0.1 },
    max_time: { kind: 'quantity', dim: 'time', positive: true },
    record_every: { kind: 'number', integer: true, nonNegative: true },
    history_every: { kind: 'quantity', dim: 'time', positive: true },
    step_without_rf: { kind: 'quantity', dim: 'time', positive: true },
  },
};

export const SCENE_SCHEMA: Field = {
  kind: 'object',
  fields: {
    name: { kind: 'string' },
    seed: { kind: 'number', integer: true, nonNegative: true },
    stages: { kind: 'list', item: stage, minItems: 1 },
    ions: { kind: 'list', item: population, minItems: 1 },
    run,
    gas: GAS_FIELD,
    detector: {
      kind: 'object',
      fields: { radius: { kind: 'quantity', dim: 'length', positive: true } },
      required: ['radius'],
    },
    space_charge: {
      kind: 'object',
      fields: {
        method: { kind: 'enum', values: ['direct', 'tree'] },
        weight: { kind: 'number', min: 1 },
        softening: { kind: 'quantity', dim: 'length', positive: true },
        theta: { kind: 'number', positive: true, max: 1.5 },
      },
      required: ['method'],
    },
    targets: TARGETS_FIELD,
  },
  required: ['stages', 'ions'],
};

export interface LoadOptions {
  /** "key.path=value" overrides from --set, applied before validation. */
  set?: string[];
  /** Replaces the scene's seed (from --seed). */
  seed?: number;
}

/** Parse "stages.0.dc=105V" into a key path and a YAML scalar value. */
export function parseOverride(text: string): { path: (string | number)[]; key: string; value: unknown } {
  const eq = text.indexOf('=');
  if (eq <= 0) throw new SceneError(`--set expects key=value such as stages.0.dc=105V, got '${text}'`);
  const key = text.slice(0, eq).trim();
  const raw = text.slice(eq + 1).trim();
  const path = key.split('.').map((p) => (/^\d+$/.test(p) ? Number(p) : p));
  let value: unknown;
  try { value = parseYaml(raw); } catch { value = raw; }
  if (value !== null && typeof value === 'object') throw new SceneError(`--set ${key}: only single values can be set, got '${raw}'`);
  return { path, key, value };
}

export function applyOverrides(doc: Document, sets: string[], origin: Origin): void {
  for (const s of sets) {
    const { path, key, value } = parseOverride(s);
    // The parent must exist (a typo should not create a new branch silently).
    const parent = path.length > 1 ? doc.getIn(path.slice(0, -1), true) : doc.contents;
    if (!parent || !(isMap(parent) || isSeq(parent))) {
      throw new SceneError(`--set ${key}: '${path.slice(0, -1).join('.')}' does not exist in ${origin.file}`);
    }
    if (isSeq(parent) && (typeof path[path.length - 1] !== 'number' || (path[path.length - 1] as number) >= parent.items.length)) {
      throw new SceneError(`--set ${key}: no entry ${String(path[path.length - 1])} in ${path.slice(0, -1).join('.')}`);
    }
    doc.setIn(path, doc.createNode(value));
    origin.overridden.add(key);
  }
}

export function loadSceneFile(file: string, opts: LoadOptions = {}): { scene: Scene; text: string } {
  let text: string;
  try {
    text = readFileSync(file, 'utf8');
  } catch (e) {
    throw new SceneError(`${file}: cannot read the scene file (${(e as NodeJS.ErrnoException).code ?? 'error'})`);
  }
  return { scene: parseScene(text, file, opts), text };
}

export function parseScene(text: string, file: string, opts: LoadOptions = {}): Scene {
  const lines = new LineCounter();
  const doc = parseDocument(text, { lineCounter: lines, prettyErrors: false });
  const origin: Origin = { file, lines, overridden: new Set() };
  yamlDocumentErrors(doc, origin);
  if (!isMap(doc.contents)) throw new SceneError(`${file}:1: a scene is a mapping with at least 'stages' and 'ions'`);
  applyOverrides(doc, opts.set ?? [], origin);
  const raw = validate(doc.contents as Node, SCENE_SCHEMA, [], origin) as Record<string, any>;
  return resolve(raw, doc, origin, opts);
}

function resolve(raw: Record<string, any>, doc: Document, origin: Origin, opts: LoadOptions): Scene {
  const stages: Stage[] = [];
  let z = 0;
  raw.stages.forEach((s: Record<string, any>, i: number) => {
    const node = doc.getIn(['stages', i], true) as Node;
    const stageGas: GasSettings | undefined = s.gas ? resolveGas(s.gas, ['stages', i, 'gas'], doc, origin) : undefined;
    const found = STAGE_ENTRIES.get(s.type);
    if (!found) throw new SceneError(`${origin.file}: stages.${i}.type: unknown stage type`);
    const made = found.entry.resolve(s, {
      z, index: i, gas: stageGas,
      fail: (key, msg) => {
        const sub = typeof key === 'string' ? key.split('.').map((p) => (/^\d+$/.test(p) ? Number(p) : p)) : [...key];
        // The line of the deepest node the path reaches (the entry's own line when none).
        let at: Node = node;
        for (let d = sub.length; d > 0; d--) {
          const n = doc.getIn(['stages', i, ...sub.slice(0, d)], true) as Node | undefined;
          if (n && typeof n === 'object') { at = n; break; }
        }
        return fail(origin, at, ['stages', i, ...sub], msg);
      },
    });
    for (const st of made) {
      if (stageGas) st.gas = stageGas;
      st.sceneIndex = i;
      stages.push(st);
      z = st.zEnd;
    }
  });

  const ions: Population[] = raw.ions.map((p: Record<string, any>, i: number): Population => {
    const charge = p.charge ?? 1;
    if (charge === 0) fail(origin, doc.getIn(['ions', i, 'charge'], true) as Node, ['ions', i, 'charge'], 'must be a non-zero whole number of elementary charges');
    const pos = p.position ?? {};
    return {
      mz: p.mz, charge, count: p.count,
      position: { x: pos.x ?? 0, y: pos.y ?? 0, z: pos.z ?? 0, spread: pos.spread ?? 0, spreadZ: pos.spread_z ?? 0 },
      energy: p.energy ?? 0, energySpread: p.energy_spread ?? 0, angleSpread: p.angle_spread ?? 0,
      direction: p.direction ?? 'axial', rfPhase: p.rf_phase ?? 'uniform',
    };
  });
  const total = ions.reduce((a, p) => a + p.count, 0);
  if (total > 100_000_000) throw new SceneError(`${origin.file}: ions: ${total} ions in all; at most 100000000 per run`);

  const r = raw.run ?? {};
  const firstRf = firstRfOf(stages);
  const spc = r.steps_per_cycle ?? 40;
  const rfStep = firstRf ? 1 / firstRf.rf.frequency / spc : undefined;
  const maxTime = r.max_time ?? 1e-3;
  const runSettings: RunSettings = {
    integrator: r.integrator ?? 'rk4',
    stepsPerCycle: spc,
    tolerance: r.tolerance ?? 1e-8,
    maxTime,
    recordEvery: r.record_every ?? 10,
    // Default grid: 200 points over the run, finer where the cloud size would alias against the
    // fastest secular motion (secular.ts).
    historyEvery: r.history_every ?? defaultHistoryEvery(maxTime, stages, ions),
    stepNoRf: r.step_without_rf ?? rfStep ?? maxTime / 10000,
  };
  // A coupled run without RF chooses its own step unless the scene sets one (sim/engine/coupled-step.ts).
  if (r.step_without_rf !== undefined) runSettings.stepNoRfSet = true;

  const scene: Scene = {
    name: raw.name ?? origin.file.replace(/^.*\//, '').replace(/\.ya?ml$/, ''),
    seed: opts.seed ?? raw.seed ?? 1,
    stages,
    ions,
    run: runSettings,
  };
  if (raw.gas) scene.gas = resolveGas(raw.gas, ['gas'], doc, origin);
  if (raw.detector) scene.detector = { radius: raw.detector.radius };
  if (raw.space_charge) {
    const sc = raw.space_charge;
    scene.spaceCharge = { method: sc.method, weight: sc.weight ?? 1, softening: sc.softening, theta: sc.theta };
  }
  if (raw.targets) {
    const t = raw.targets as Targets;
    if (t.mz_window_low !== undefined && t.mz_window_high !== undefined && !(t.mz_window_high > t.mz_window_low)) {
      fail(origin, doc.getIn(['targets', 'mz_window_high'], true) as Node, ['targets', 'mz_window_high'], `must be above targets.mz_window_low (${t.mz_window_low}), got '${t.mz_window_high}'`);
    }
    scene.targets = { ...t };
  }
  return scene;
}

function defaultHistoryEvery(maxTime: number, stages: Stage[], ions: Population[]): number {
  const sec = fastestSecular(stages, ions);
  const fine = sec ? 1 / (HISTORY_STEPS_PER_SECULAR * sec.hz) : Infinity;
  return Math.min(maxTime / 200, fine);
}
