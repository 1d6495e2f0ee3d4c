import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['tests/shared/**/*.test.ts', 'tests/server/**/*.test.ts', 'tests/client/**/*.test.{ts,tsx}'],
    environment: 'node',
    pool: 'forks',
    testTimeout: 30_000,
    hookTimeout: 30_000,
  },
});
