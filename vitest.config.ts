import { defineConfig } from 'vitest/config';

// Timeouts only catch a hang: the suite must pass on a machine three times slower than the one it was written on, or
// on a busy one, so no test may fail for taking long. Long work belongs in test/bench, not here.
const HANG_MS = 600_000;

export default defineConfig({
  test: {
    include: ['test/**/*.test.ts'],
    exclude: ['test/bench/**', 'node_modules/**'],
    testTimeout: HANG_MS,
    hookTimeout: HANG_MS,
    pool: 'forks',
  },
});
