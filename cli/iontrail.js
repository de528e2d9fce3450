#!/usr/bin/env node
// Entry point installed as `iontrail`; the TypeScript sources are compiled to dist/ by `npm ci` (prepare).
import { main } from '../dist/cli/main.js';

main(process.argv.slice(2)).then(
  (code) => { process.exitCode = code; },
  (err) => {
    process.stderr.write(`iontrail: internal error: ${err && err.stack ? err.stack : err}\n`);
    process.exitCode = 70;
  },
);
