import { defineConfig } from 'vitest/config';

// Browser tests: playwright-core drives Debian's Chromium against a server started by the global setup.
export default defineConfig({
  test: {
    include: ['tests/e2e/**/*.test.ts'],
    environment: 'node',
    globalSetup: ['tests/e2e/global-setup.ts'],
    fileParallelism: false,
    testTimeout: 120000,
    hookTimeout: 120000,
  },
});
