/// <reference types="vitest/config" />
import { defineConfig } from 'vite';
import react from '@vitejs/plugin-react';
import tailwindcss from '@tailwindcss/vite';
import { compression, defineAlgorithm } from 'vite-plugin-compression2';

const apiPort = Number(process.env.PORT ?? 3000);

export default defineConfig({
  plugins: [
    react(),
    tailwindcss(),
    // Brotli and gzip copies written at build time beside each asset; the server sends the one the
    // browser accepts (express-static-gzip, decision 45).
    compression({
      algorithms: [defineAlgorithm('brotliCompress'), defineAlgorithm('gzip')],
      include: /\.(js|css|html|svg|json|woff2?)$/,
      threshold: 1024,
    }),
  ],
  server: {
    host: '127.0.0.1',
    port: 5173,
    proxy: { '/api': `http://127.0.0.1:${apiPort}` },
  },
  build: { outDir: 'dist', emptyOutDir: true, chunkSizeWarningLimit: 700 },
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
