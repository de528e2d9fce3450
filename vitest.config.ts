import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    // A temp dir of the suite's own, checked for leftovers at the end; every test file removes
    // the folders it made with tempDir() (test/helpers/temp.ts).
    globalSetup: ['test/helpers/temp-guard.ts'],
    setupFiles: ['test/helpers/temp-cleanup.ts'],
  },
});
