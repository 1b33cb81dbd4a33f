import { defineConfig } from 'vitest/config';
import { defaultServerConditions } from 'vite';

// Timeouts only catch a hang: the suite must pass on a machine three times slower than the one it was written on, or
// on a busy one, so no test may fail for taking long. Long work belongs in test/bench, not here.
const HANG_MS = 600_000;

export default defineConfig({
  // The 'rungs-source' condition maps the package's own name to src/index.ts (package.json exports), so a study
  // that imports 'rungs' and the code under test share one copy of the library, never a stale dist/.
  ssr: { resolve: { conditions: [...defaultServerConditions, 'rungs-source'] } },
  test: {
    include: ['test/**/*.test.ts'],
    exclude: ['test/bench/**', 'node_modules/**'],
    testTimeout: HANG_MS,
    hookTimeout: HANG_MS,
    pool: 'forks',
  },
});
