import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['tests/shared/**/*.test.ts', 'tests/server/**/*.test.ts', 'tests/client/**/*.test.{ts,tsx}'],
    environment: 'node',
    pool: 'forks',
    // Two files at a time even on two cores (vitest's default is cores − 1, so one at a time there):
    // much of a server test is waiting (a child server starting, PostgreSQL answering, a timer), and
    // each file has its own database, directory and ports, so two never share anything.
    maxWorkers: 2,
    testTimeout: 30_000,
    hookTimeout: 30_000,
  },
});
