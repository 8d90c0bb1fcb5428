import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, posix, relative, resolve } from 'node:path';
import preact from '@preact/preset-vite';
import type { Plugin } from 'vite';
import { VitePWA } from 'vite-plugin-pwa';
import { defineConfig } from 'vitest/config';

const projectDir = import.meta.dirname;
const manifestDir = resolve(projectDir, 'manifest');
const appVersion: string = JSON.parse(readFileSync(resolve(projectDir, 'package.json'), 'utf8')).version;

/** Every file under manifest/, as [public URL path without leading slash, absolute file path]. */
function manifestFiles(dir = manifestDir): Array<[string, string]> {
  return readdirSync(dir).flatMap((name): Array<[string, string]> => {
    const file = join(dir, name);
    if (statSync(file).isDirectory()) return manifestFiles(file);
    return [[relative(manifestDir, file).split('\\').join(posix.sep), file]];
  });
}

const MIME: Record<string, string> = {
  webmanifest: 'application/manifest+json',
  png: 'image/png',
  svg: 'image/svg+xml',
};

/** Serves manifest/ at the site root in dev and copies it into the build (the design card keeps it out of public/). */
function webAppManifest(): Plugin {
  return {
    name: 'crankhouse:web-app-manifest',
    configureServer(server) {
      const files = new Map(manifestFiles().map(([url, file]) => [`/${url}`, file]));
      server.middlewares.use((req, res, next) => {
        const file = req.url ? files.get(req.url.split('?')[0] ?? '') : undefined;
        if (!file) return next();
        res.setHeader('Content-Type', MIME[file.split('.').pop() ?? ''] ?? 'application/octet-stream');
        res.end(readFileSync(file));
      });
    },
    generateBundle() {
      for (const [fileName, file] of manifestFiles()) {
        this.emitFile({ type: 'asset', fileName, source: readFileSync(file) });
      }
    },
  };
}

export default defineConfig({
  root: resolve(projectDir, 'src'),
  publicDir: resolve(projectDir, 'public'),
  define: { __APP_VERSION__: JSON.stringify(appVersion) },
  // `npm run dev` serves the page with hot reload; the API comes from `npm run serve` on port 8080.
  server: { proxy: { '/api': 'http://localhost:8080' } },
  build: {
    outDir: resolve(projectDir, 'dist'),
    emptyOutDir: true,
    target: 'es2022',
    sourcemap: false,
  },
  plugins: [
    preact(),
    webAppManifest(),
    VitePWA({
      strategies: 'injectManifest',
      srcDir: 'sw',
      filename: 'sw.ts',
      injectRegister: false,
      manifest: false,
      injectManifest: {
        // Everything the app can load offline: the shell, every lazy chunk, styles, the manifest and its icons.
        globPatterns: ['**/*.{js,css,html,webmanifest,svg,png,woff2}'],
        globIgnores: ['sw.js'],
        dontCacheBustURLsMatching: /^assets\//,
      },
      devOptions: { enabled: false },
    }),
  ],
  test: {
    // Read by test/support/summary.mjs for CI's closing line; absolute because Vite's root is src/.
    outputFile: { json: resolve(projectDir, 'test-results.json') },
    projects: [
      {
        root: projectDir,
        define: { __APP_VERSION__: JSON.stringify(appVersion) },
        test: {
          name: 'node',
          include: ['test/**/*.test.{ts,tsx}'],
          exclude: ['test/e2e/**', '**/node_modules/**'],
          environment: 'node',
        },
      },
      {
        root: projectDir,
        test: {
          name: 'browser',
          include: ['test/e2e/**/*.test.ts'],
          environment: 'node',
          fileParallelism: false,
          testTimeout: 120_000,
          hookTimeout: 120_000,
        },
      },
    ],
  },
});
