import { defineConfig } from 'vitest/config';
import { fileURLToPath } from 'node:url';

// Browser tests: each file starts the built app (`next build` first) and a headless chromium through
// test/e2e/harness.ts. One file at a time: the machine's cores go to the server and the browser.
export default defineConfig({
  resolve: { alias: { '@': fileURLToPath(new URL('./src', import.meta.url)) } },
  test: {
    include: ['test/e2e/**/*.e2e.ts'],
    environment: 'node',
    pool: 'forks',
    fileParallelism: false,
    testTimeout: 120_000,
    hookTimeout: 120_000,
  },
});
