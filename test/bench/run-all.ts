// npm run bench: runs every test/bench/*.bench.ts (compiled to dist) in turn, or those named:
// npm run bench -- engine gas

import { readdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const here = dirname(fileURLToPath(import.meta.url));
const only = process.argv.slice(2);
const files = readdirSync(here).filter((f) => f.endsWith('.bench.js')).sort()
  .filter((f) => only.length === 0 || only.includes(f.replace(/\.bench\.js$/, '')));
for (const f of files) {
  console.log(`\n=== ${f.replace(/\.bench\.js$/, '')} ===`);
  const mod = (await import(pathToFileURL(join(here, f)).href)) as { bench: () => Promise<void> };
  await mod.bench();
}
