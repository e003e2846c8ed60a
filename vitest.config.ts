import { defineConfig } from 'vitest/config';

// Unit tests sit beside code (packages/*/src, apps/*/src); cross-package and reference
// checks live in tests/. Browser tests (tests/e2e) run separately through tests/e2e/run.mjs.
export default defineConfig({
  test: {
    include: ['packages/*/src/**/*.test.ts', 'apps/*/src/**/*.test.ts', 'tests/reference/**/*.test.ts', 'tests/unit/**/*.test.ts'],
    exclude: ['**/node_modules/**', 'tests/e2e/**'],
    testTimeout: 30000,
    pool: 'threads',
    setupFiles: ['tests/setup-fast-check.ts'],
  },
});
