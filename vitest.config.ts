import { defineConfig } from 'vitest/config';
import { fileURLToPath } from 'node:url';

export default defineConfig({
  resolve: { alias: { '@': fileURLToPath(new URL('./src', import.meta.url)) } },
  test: {
    include: ['test/unit/**/*.test.ts', 'test/reference/**/*.test.ts'],
    environment: 'node',
    testTimeout: 30000,
    pool: 'forks',
  },
});
