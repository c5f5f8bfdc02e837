import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['test/**/*.test.ts'],
    // NIST StRD and end-to-end suites fit many problems; generous per-test timeout, no timing assertions.
    testTimeout: 120_000,
    hookTimeout: 180_000,
    pool: 'forks',
  },
});
