import { fileURLToPath, URL } from 'node:url';
import { defineConfig } from 'vite';
import vue from '@vitejs/plugin-vue';

const apiPort = process.env.PORT ?? '4780';

export default defineConfig({
  plugins: [vue()],
  resolve: {
    alias: [
      { find: '@', replacement: fileURLToPath(new URL('./src', import.meta.url)) },
      { find: '@shared', replacement: fileURLToPath(new URL('./shared', import.meta.url)) },
      // The CSV writer's Node build reads Node's Buffer when it loads; the browser gets the package's own browser build.
      { find: /^csv-stringify\/sync$/, replacement: 'csv-stringify/browser/esm/sync' },
    ],
  },
  server: {
    host: '127.0.0.1',
    port: 5173,
    // /dev is the development mailbox the API serves beside the fakes.
    proxy: { '/api': `http://127.0.0.1:${apiPort}`, '/dev': `http://127.0.0.1:${apiPort}` },
  },
  // Module workers (the Planner's carry map) may share chunks with the page.
  worker: { format: 'es' },
  build: { outDir: 'dist', chunkSizeWarningLimit: 1500 },
});
