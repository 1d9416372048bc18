import { fileURLToPath, URL } from 'node:url';
import { defineConfig, type Plugin } from 'vite';
import vue from '@vitejs/plugin-vue';

const apiPort = process.env.PORT ?? '4780';

/** The typeface files index.html preloads: the body text's and the labels' and headings' weights of every screen. */
const PRELOADED_FONTS = /^source-sans-3-latin-(400|600)-normal-.*\.woff2$/;

/**
 * Adds `<link rel="preload">` for the built (hashed) font files that match PRELOADED_FONTS, so that the browser
 * fetches them beside the script instead of after the styles and the first render have asked for them.
 */
function preloadFonts(): Plugin {
  let base = '/';
  return {
    name: 'arcwright-preload-fonts',
    apply: 'build',
    configResolved(config) {
      base = config.base;
    },
    transformIndexHtml: {
      order: 'post',
      handler(_html, ctx) {
        const files = Object.keys(ctx.bundle ?? {}).filter((file) => PRELOADED_FONTS.test(file.split('/').pop() ?? ''));
        return files.sort().map((file) => ({
          tag: 'link',
          attrs: { rel: 'preload', href: `${base}${file}`, as: 'font', type: 'font/woff2', crossorigin: '' },
          injectTo: 'head' as const,
        }));
      },
    },
  };
}

export default defineConfig({
  plugins: [vue(), preloadFonts()],
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
