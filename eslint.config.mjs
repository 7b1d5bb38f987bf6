// ESLint flat config: Next's rules (core web vitals, React, react-hooks) and its TypeScript rules.
// `npm run lint` runs it; .ci/run runs it before the tests.
import nextVitals from 'eslint-config-next/core-web-vitals';
import nextTypescript from 'eslint-config-next/typescript';

const config = [
  ...nextVitals,
  ...nextTypescript,
  {
    ignores: [
      'node_modules/**',
      '.next/**',
      '.next-*/**',
      '.data/**',
      'uploads/**',
      'next-env.d.ts',
      'test-results/**',
      'playwright-report/**',
      // AssemblyScript (compiled to WebAssembly by scripts/build-kernels.mjs), not TypeScript for ESLint's parser
      'lib/decomposition/wasm/*.as.ts',
    ],
  },
  {
    linterOptions: { reportUnusedDisableDirectives: 'error' },
    rules: {
      // `_name` marks a value that is destructured away on purpose (e.g. a password hash dropped from a row)
      '@typescript-eslint/no-unused-vars': ['warn', { argsIgnorePattern: '^_', varsIgnorePattern: '^_', ignoreRestSiblings: true }],
    },
  },
];

export default config;
