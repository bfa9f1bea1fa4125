// Lint: typescript-eslint's recommended rules, React's hooks rules, lines of at most 120 characters, and the
// layer rule of lint/layers.js. Formatting is prettier's (npm run format); `npm test` runs both checks.
import js from '@eslint/js';
import tseslint from 'typescript-eslint';
import reactHooks from 'eslint-plugin-react-hooks';
import globals from 'globals';
import fulcra from './lint/layers.js';

export default tseslint.config(
  {
    ignores: [
      'dist/**',
      'dist-single/**',
      'dist-e2e-*/**',
      'node_modules/**',
      'tests/fixtures/**',
      'src/report/fonts/**',
      'test-results/**',
      'playwright-report/**',
      'bench-out/**',
      '.cli-build/**',
    ],
  },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    files: ['**/*.{ts,tsx,js,mjs}'],
    languageOptions: { globals: { ...globals.browser, ...globals.node, ...globals.worker } },
    plugins: { fulcra },
    rules: {
      'max-len': ['error', { code: 120, ignoreUrls: false }],
      'fulcra/layers': 'error',
      '@typescript-eslint/no-unused-vars': [
        'error',
        { argsIgnorePattern: '^_', varsIgnorePattern: '^_', destructuredArrayIgnorePattern: '^_' },
      ],
    },
  },
  {
    files: ['src/ui/**/*.{ts,tsx}', 'src/main.tsx'],
    plugins: { 'react-hooks': reactHooks },
    rules: { ...reactHooks.configs.recommended.rules },
  },
);
