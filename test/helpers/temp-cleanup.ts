// Setup file of every test file (vitest.config.ts): removes the folders tempDir made.

import { afterAll } from 'vitest';
import { removeTempDirs } from './temp.js';

afterAll(removeTempDirs);
