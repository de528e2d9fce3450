// The import graph of the project's sources (sim/, render/, cli/), type-only imports included.
import { readFileSync, readdirSync, statSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';
import { repoRoot } from '../bench/cbuild.js';

export function sourceFiles(root = repoRoot()): string[] {
  const out: string[] = [];
  const walk = (d: string) => {
    for (const e of readdirSync(d)) {
      const p = join(d, e);
      if (statSync(p).isDirectory()) walk(p);
      else if (p.endsWith('.ts')) out.push(relative(root, p));
    }
  };
  for (const top of ['sim', 'render', 'cli']) walk(join(root, top));
  return out.sort();
}

const IMPORT = /(?:^|\n)\s*(?:import|export)\s[^'"`;]*?from\s*['"](\.{1,2}\/[^'"]+)['"]|import\(\s*['"](\.{1,2}\/[^'"]+)['"]\s*\)/g;

/** Each source file's relative imports, as repository-relative .ts paths. */
export function importGraph(root = repoRoot()): Map<string, string[]> {
  const g = new Map<string, string[]>();
  for (const f of sourceFiles(root)) {
    const text = readFileSync(join(root, f), 'utf8');
    const deps: string[] = [];
    for (const m of text.matchAll(IMPORT)) {
      const spec = m[1] ?? m[2];
      deps.push(relative(root, resolve(dirname(join(root, f)), spec)).replace(/\.js$/, '.ts'));
    }
    g.set(f, deps);
  }
  return g;
}

/** One import cycle if there is any (file-level, depth-first), else null. */
export function findCycle(g: Map<string, string[]>): string[] | null {
  const state = new Map<string, 1 | 2>();
  const stack: string[] = [];
  const visit = (f: string): string[] | null => {
    state.set(f, 1); stack.push(f);
    for (const d of g.get(f) ?? []) {
      if (!g.has(d)) continue;
      if (state.get(d) === 1) return [...stack.slice(stack.indexOf(d)), d];
      if (state.get(d) === undefined) { const c = visit(d); if (c) return c; }
    }
    stack.pop(); state.set(f, 2);
    return null;
  };
  for (const f of g.keys()) if (state.get(f) === undefined) { const c = visit(f); if (c) return c; }
  return null;
}
