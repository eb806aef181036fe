import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['test/**/*.test.ts'],
    // Native DuckDB and canvas bindings are safest in forked processes.
    pool: 'forks',
    testTimeout: 120_000,
    hookTimeout: 300_000,
    env: { TZ: 'UTC' },
  },
});
