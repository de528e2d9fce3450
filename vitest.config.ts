import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    // A temp dir of the suite's own, checked for leftovers at the end; every test file removes
    // the folders it made with tempDir() (test/helpers/temp.ts).
    globalSetup: ['test/helpers/temp-guard.ts'],
    setupFiles: ['test/helpers/temp-cleanup.ts'],
    // Two test files at a time on the 2-core CI machine (vitest's default is one fewer than the
    // cores): most files spend their time waiting on a child CLI process or a browser, and the
    // suite's wall time must stay under 10 minutes. Results never depend on timing (no timed tests).
    maxWorkers: 2,
  },
});
