import { resolve } from 'node:path';
import { defineConfig } from 'vitest/config';

// Browser tests: one file at a time (one chromium at a time on a 2-core machine); the
// global setup builds the editor once and serves dist/editor for every file.
export default defineConfig({
  root: resolve(import.meta.dirname, '..', '..'),
  test: {
    include: ['tests/e2e/**/*.e2e.ts'],
    globalSetup: ['tests/e2e/harness.ts'],
    fileParallelism: false,
    pool: 'forks',
    testTimeout: 60_000,
    hookTimeout: 90_000,
  },
});
