// npm run wasm: assembles sim/fields/simd/pair3.wat with wabt (the WebAssembly Binary Toolkit,
// npm package wabt) and writes its bytes, base64, into sim/fields/simd/pair3-binary.ts. The run
// time reads only that file (no assembler at run time); test/fields/simd.test.ts checks that the
// two agree.

import { readFileSync, renameSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import wabtInit from 'wabt';
import { repoRoot } from '../bench/cbuild.js';

export async function assemblePair3(): Promise<string> {
  const wabt = await wabtInit();
  const file = join(repoRoot(), 'sim/fields/simd/pair3.wat');
  const mod = wabt.parseWat('pair3.wat', readFileSync(file, 'utf8'), { simd: true });
  try {
    mod.validate();
    return Buffer.from(mod.toBinary({}).buffer).toString('base64');
  } finally {
    mod.destroy();
  }
}

if (process.argv[1]?.endsWith('assemble-wasm.js')) {
  const b64 = await assemblePair3();
  const out = join(repoRoot(), 'sim/fields/simd/pair3-binary.ts');
  const text = `// The WebAssembly binary of pair3.wat (beside this file), base64. Generated: \`npm run wasm\`
// (test/tools/assemble-wasm.ts, wabt); test/fields/simd.test.ts assembles the .wat again and
// checks that it gives these bytes, so the two cannot drift apart.
export const PAIR3_WASM = '${b64}';
`;
  writeFileSync(`${out}.tmp`, text);
  renameSync(`${out}.tmp`, out);
  process.stdout.write(`${out}: ${Buffer.from(b64, 'base64').length} bytes\n`);
}
