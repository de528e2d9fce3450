// Command-line flags: "--key value", "--key=value", repeated keys, booleans, and negative
// numbers as values ("--dc -12V"). Positional arguments are kept in order.

import { UsageError } from './errors.js';
import { closest } from '../sim/core/closest.js';

export interface FlagSpec {
  /** Flags that take a value. */
  values: readonly string[];
  /** Flags that are switches (no value). */
  switches?: readonly string[];
  /** Value flags that may be given more than once. */
  repeatable?: readonly string[];
  /** Short aliases, e.g. { o: 'out' }. */
  aliases?: Record<string, string>;
}

export interface ParsedArgs {
  positional: string[];
  values: Map<string, string[]>;
  switches: Set<string>;
}

export function parseArgs(argv: readonly string[], spec: FlagSpec, command: string): ParsedArgs {
  const values = new Map<string, string[]>();
  const switches = new Set<string>();
  const positional: string[] = [];
  const valueSet = new Set(spec.values);
  const switchSet = new Set(spec.switches ?? []);
  const repeat = new Set(spec.repeatable ?? []);
  for (let i = 0; i < argv.length; i++) {
    const arg = argv[i];
    if (arg === '--') { positional.push(...argv.slice(i + 1)); break; }
    let name: string | undefined;
    let inline: string | undefined;
    if (arg.startsWith('--') && arg.length > 2) {
      const eq = arg.indexOf('=');
      name = eq >= 0 ? arg.slice(2, eq) : arg.slice(2);
      inline = eq >= 0 ? arg.slice(eq + 1) : undefined;
    } else if (/^-[A-Za-z]$/.test(arg)) {
      const alias = spec.aliases?.[arg.slice(1)];
      if (!alias) throw new UsageError(`${command}: unknown option ${arg}`);
      name = alias;
    } else {
      positional.push(arg);
      continue;
    }
    if (switchSet.has(name)) {
      if (inline !== undefined) throw new UsageError(`${command}: --${name} takes no value`);
      switches.add(name);
      continue;
    }
    if (!valueSet.has(name)) {
      const hint = closest(name, [...valueSet, ...switchSet]);
      throw new UsageError(`${command}: unknown option --${name}${hint ? ` (did you mean --${hint}?)` : ''}`);
    }
    let value = inline;
    if (value === undefined) {
      const next = argv[i + 1];
      // A following token is a value unless it is itself a known flag; "-12V" is a value.
      if (next === undefined || (next.startsWith('--') && next.length > 2)) {
        throw new UsageError(`${command}: --${name} needs a value`);
      }
      value = next;
      i++;
    }
    const list = values.get(name) ?? [];
    if (list.length > 0 && !repeat.has(name)) throw new UsageError(`${command}: --${name} given twice`);
    list.push(value);
    values.set(name, list);
  }
  return { positional, values, switches };
}

/** The one value of a flag, or undefined. */
export function flag(args: ParsedArgs, name: string): string | undefined {
  return args.values.get(name)?.[0];
}

/** The value of a flag that must be given. */
export function requireFlag(args: ParsedArgs, name: string, command: string, example: string): string {
  const v = flag(args, name);
  if (v === undefined) throw new UsageError(`${command}: missing --${name} (for example --${name} ${example})`);
  return v;
}

export { closest } from '../sim/core/closest.js';
