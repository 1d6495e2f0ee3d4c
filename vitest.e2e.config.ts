import { defineConfig } from 'vitest/config';

// Browser tests: the real server (built client, fresh SQLite file, fake SMTP) driven by Debian's Chromium.
export default defineConfig({
  test: {
    include: ['tests/e2e/**/*.e2e.ts'],
    globalSetup: ['tests/e2e/global-setup.ts'],
    pool: 'forks',
    fileParallelism: false,
    testTimeout: 60_000,
    hookTimeout: 60_000,
  },
});
