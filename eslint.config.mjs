// ESLint 9 flat configuration: Next.js core web vitals and TypeScript rules (Next 16 has no `next lint`).
import { defineConfig, globalIgnores } from 'eslint/config';
import nextVitals from 'eslint-config-next/core-web-vitals';
import nextTypeScript from 'eslint-config-next/typescript';

export default defineConfig([
  ...nextVitals,
  ...nextTypeScript,
  globalIgnores(['src/generated/**', '.next/**', 'node_modules/**', 'next-env.d.ts', 'test-results/**', 'bench/results/**', 'coverage/**']),
  {
    rules: {
      // Unused code is reported as a warning (it does not fail the check); `_name` marks one kept on purpose.
      '@typescript-eslint/no-unused-vars': ['warn', { argsIgnorePattern: '^_', varsIgnorePattern: '^_', caughtErrorsIgnorePattern: '^_' }],
    },
  },
]);
