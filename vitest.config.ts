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
    testTimeout: 30000,
    hookTimeout: 60000,
  },
});
