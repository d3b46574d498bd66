import type { Plugin } from 'vite';
import { defineConfig } from 'vitest/config';
import { svelte } from '@sveltejs/vite-plugin-svelte';

// The dev server injects component CSS as <style> elements (hot reload); the built page
// never does. Relax style-src in dev only, so that index.html keeps the strict policy.
function devStylePolicy(): Plugin {
  return {
    name: 'gatesmith-dev-style-policy',
    apply: 'serve',
    transformIndexHtml: (html) => html.replace("style-src 'self'", "style-src 'self' 'unsafe-inline'"),
  };
}

export default defineConfig({
  plugins: [svelte(), devStylePolicy()],
  server: { host: '127.0.0.1', strictPort: false },
  preview: { host: '127.0.0.1' },
  // Every asset, the wasm included, is served from the page's origin: nothing inlined as
  // data: URLs (the CSP allows only 'self') and nothing fetched from elsewhere.
  // GATESMITH_READABLE_BUILD=1 (the app benchmark's --attribute): unminified, so that traces name functions.
  build: { outDir: 'build/app', assetsInlineLimit: 0, target: 'es2022', chunkSizeWarningLimit: 1024, ...(process.env.GATESMITH_READABLE_BUILD ? { minify: false } : {}) },
  worker: { format: 'es' },
  test: {
    include: ['tests/**/*.test.ts'],
    globalSetup: ['tests/global-setup.ts'],
    testTimeout: 60_000,
    pool: 'forks',
  },
});
