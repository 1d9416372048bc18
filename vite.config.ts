import { fileURLToPath, URL } from 'node:url';
import { defineConfig, type IndexHtmlTransformContext, type Plugin } from 'vite';
import vue from '@vitejs/plugin-vue';

const apiPort = process.env.PORT ?? '4780';

/** The page most first visits open (the sign-in page, where `/` sends a visitor who is not signed in). */
const FIRST_PAGE = '/src/views/SignInView.vue';

/** The typeface files index.html preloads: the body text's and the labels' and headings' weights of every screen. */
const PRELOADED_FONTS = /^source-sans-3-latin-(400|600)-normal-.*\.woff2$/;

type Bundle = NonNullable<IndexHtmlTransformContext['bundle']>;

/** A build-only plugin that adds the `<link>`s `linksOf` picks from the built bundle to the head of index.html. */
function headLinks(name: string, linksOf: (bundle: Bundle) => Record<string, string>[]): Plugin {
  let base = '/';
  return {
    name,
    apply: 'build',
    configResolved(config) {
      base = config.base;
    },
    transformIndexHtml: {
      order: 'post',
      handler: (_html, ctx) =>
        linksOf(ctx.bundle ?? {}).map(({ file, ...attrs }) => ({ tag: 'link', attrs: { ...attrs, href: `${base}${file}` }, injectTo: 'head' as const })),
    },
  };
}

/**
 * `<link rel="preload">` for the built (hashed) font files that match PRELOADED_FONTS, so that the browser fetches
 * them beside the script instead of after the styles and the first render have asked for them.
 */
const preloadFonts = () =>
  headLinks('arcwright-preload-fonts', (bundle) =>
    Object.keys(bundle)
      .filter((file) => PRELOADED_FONTS.test(file.split('/').pop() ?? ''))
      .sort()
      .map((file) => ({ rel: 'preload', file, as: 'font', type: 'font/woff2', crossorigin: '' })),
  );

/**
 * `<link rel="modulepreload">` for the first page's chunk and the chunks it imports, so that the browser fetches
 * them beside the entry script rather than after the entry has run and the router has asked for them. A
 * signed-in visitor needs most of those chunks (forms, schemas) on the other pages too.
 */
const preloadFirstPage = () =>
  headLinks('arcwright-preload-first-page', (bundle) => {
    const chunks = Object.values(bundle).filter((file) => file.type === 'chunk');
    const files = new Set<string>();
    const visit = (fileName: string) => {
      const chunk = chunks.find((c) => c.fileName === fileName);
      if (!chunk || chunk.isEntry || files.has(fileName)) return;
      files.add(fileName);
      chunk.imports.forEach(visit);
    };
    const page = chunks.find((chunk) => chunk.facadeModuleId?.endsWith(FIRST_PAGE));
    if (page) visit(page.fileName);
    return [...files].map((file) => ({ rel: 'modulepreload', file, crossorigin: '' }));
  });

export default defineConfig({
  plugins: [vue(), preloadFonts(), preloadFirstPage()],
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
