/// <reference types="vitest/config" />
import path from 'node:path';
import { defineConfig, type Plugin } from 'vite';
import react from '@vitejs/plugin-react';
import tailwindcss from '@tailwindcss/vite';
import { compression, defineAlgorithm } from 'vite-plugin-compression2';
import { VitePWA } from 'vite-plugin-pwa';

const apiPort = Number(process.env.PORT ?? 3000);
/** Names this build: the persisted query cache of an older build is dropped (decision 42). */
const buildId = new Date().toISOString();

/**
 * Chunks (decision 47). What every screen runs on, the sign-in screen included, in one file each
 * rather than rolldown's dozens of small shared pieces: the framework (React, React Router,
 * TanStack Query, the offline store, the service worker's page side) and forms (zod, react-hook-form
 * and its resolver). Charting (recharts and what it brings) is one chunk of its own, loaded only by
 * a screen with a chart.
 */
const framework =
  /[\\/]node_modules[\\/](react|react-dom|scheduler|react-router|@tanstack[\\/](query-core|react-query|query-persist-client-core|react-query-persist-client|query-async-storage-persister)|idb-keyval|workbox-window)[\\/]/;
/** TanStack Query's reading side (observers, useQuery and its kin): for the pages that read data, not the sign-in form. */
const queryHooks =
  /[\\/]@tanstack[\\/](query-core[\\/]build[\\/]modern[\\/](queryObserver|queriesObserver|infiniteQueryObserver)|react-query[\\/]build[\\/]modern[\\/](useBaseQuery|useQuery|useQueries|useSuspenseQuery|useSuspenseQueries|useInfiniteQuery|useSuspenseInfiniteQuery|suspense|errorBoundaryUtils|QueryErrorResetBoundary|IsRestoringProvider))\.js$/;
const forms = /[\\/]node_modules[\\/](zod|react-hook-form|@hookform[\\/]resolvers)[\\/]/;
const charts = /[\\/]node_modules[\\/]recharts[\\/]/;
/** Our own building blocks that nearly every screen imports (controls, paths, the fetch client, form errors). */
const blocks =
  /[\\/](src[\\/](components[\\/]ui[\\/](alert|button|field|page)|components[\\/]layout[\\/]logo|config[\\/]paths|lib[\\/](api-client|form|query-client)|features[\\/]auth[\\/]api)|shared[\\/]schemas[\\/](fields|auth))\.tsx?$/;
/** The bundler's own helpers (module runtime, preload) and the service worker registration: with the framework. */
const helpers = (id: string) => id.startsWith('\0') || id.includes('virtual:pwa-register');

/**
 * Writes `dist/.vite/chunks.json`: each chunk's file, the module it stands for, its static and
 * dynamic imports and the modules with code in it (paths from the project root), so that
 * `tests/server/static-files.test.ts` can check what the sign-in page loads (decision 47). A
 * dot-folder is not served, and JSON is not precached.
 */
function chunkMap(): Plugin {
  const fromRoot = (id: string) => (id.startsWith('\0') ? id : path.relative(process.cwd(), id).split(path.sep).join('/'));
  return {
    name: 'kerfwise-chunk-map',
    apply: 'build',
    generateBundle(_options, bundle) {
      const chunks = Object.values(bundle).flatMap((c) =>
        c.type === 'chunk'
          ? [
              {
                file: c.fileName,
                isEntry: c.isEntry,
                facade: c.facadeModuleId ? fromRoot(c.facadeModuleId) : null,
                imports: c.imports,
                dynamicImports: c.dynamicImports,
                modules: Object.entries(c.modules)
                  .filter(([, m]) => m.renderedLength > 0)
                  .map(([id]) => fromRoot(id)),
              },
            ]
          : [],
      );
      this.emitFile({ type: 'asset', fileName: '.vite/chunks.json', source: JSON.stringify(chunks, null, 1) });
    },
  };
}

export default defineConfig({
  define: { __KERFWISE_BUILD__: JSON.stringify(buildId) },
  plugins: [
    react(),
    chunkMap(),
    tailwindcss(),
    // An installable app that opens with no network (decision 42): our own service worker
    // (src/sw.ts) precaches the shell, every route chunk and the fonts.
    VitePWA({
      strategies: 'injectManifest',
      srcDir: 'src',
      filename: 'sw.ts',
      registerType: 'prompt',
      injectRegister: false,
      injectManifest: {
        globPatterns: ['**/*.{js,css,html,svg,woff2,woff,png}'],
        maximumFileSizeToCacheInBytes: 5 * 1024 * 1024,
      },
      includeAssets: ['icon.svg'],
      manifest: {
        name: 'Kerfwise — cutter rounds and wear',
        short_name: 'Kerfwise',
        description: 'Disc-cutter wear rounds, change-outs and stops for a tunnel boring machine drive.',
        start_url: '/',
        scope: '/',
        display: 'standalone',
        background_color: '#1d201c',
        theme_color: '#1d201c',
        icons: [{ src: '/icon.svg', sizes: 'any', type: 'image/svg+xml', purpose: 'any' }],
      },
      devOptions: { enabled: false },
    }),
    // Brotli and gzip copies written at build time beside each asset; the server sends the one the
    // browser accepts (express-static-gzip, decision 44).
    compression({
      algorithms: [defineAlgorithm('brotliCompress'), defineAlgorithm('gzip')],
      include: /\.(js|css|html|svg|json|woff2?)$/,
      // The chunk list is for the tests, never sent (decision 47).
      exclude: /(^|[\\/])\.vite[\\/]/,
      threshold: 1024,
    }),
  ],
  server: {
    host: '127.0.0.1',
    port: 5173,
    proxy: { '/api': `http://127.0.0.1:${apiPort}` },
  },
  build: {
    outDir: 'dist',
    emptyOutDir: true,
    chunkSizeWarningLimit: 700,
    rolldownOptions: {
      output: {
        codeSplitting: {
          groups: [
            { name: 'query-hooks', test: queryHooks, priority: 4, includeDependenciesRecursively: false },
            { name: 'framework', test: (id) => framework.test(id) || helpers(id), priority: 3 },
            { name: 'forms', test: forms, priority: 2 },
            { name: 'charts', test: charts, priority: 1 },
            { name: 'blocks', test: blocks, priority: 1 },
          ],
        },
      },
    },
  },
  test: {
    include: ['tests/**/*.test.ts'],
    globalSetup: ['tests/support/global-setup.ts'],
    setupFiles: ['tests/support/setup-env.ts'],
    reporters: ['default', './tests/support/totals-reporter.ts'],
    testTimeout: 30_000,
    // Browser tests poll the page; on a loaded 2-core machine a screen can take seconds to settle.
    expect: { poll: { timeout: 15_000 } },
    hookTimeout: 120_000,
    pool: 'forks',
  },
});
