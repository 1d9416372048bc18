import { fileURLToPath, URL } from 'node:url';
import { defineConfig } from 'vitest/config';

// Unit and API tests. API tests share one private MariaDB test database: run files one at a time.
export default defineConfig({
  resolve: {
    alias: {
      '@': fileURLToPath(new URL('./src', import.meta.url)),
      '@shared': fileURLToPath(new URL('./shared', import.meta.url)),
    },
  },
  test: {
    include: ['tests/shared/**/*.test.ts', 'tests/server/**/*.test.ts', 'tests/client/**/*.test.ts'],
    environment: 'node',
    globalSetup: ['tests/support/global-setup.ts'],
    fileParallelism: false,
    // A cheaper scrypt than the production default (2^17) keeps sign-ups and sign-ins fast in tests.
    env: { PASSWORD_SCRYPT_LOG_N: process.env.PASSWORD_SCRYPT_LOG_N ?? '12' },
    testTimeout: 30000,
    hookTimeout: 60000,
  },
});
