// Lint rules for the whole tree (`npm run lint`, part of `npm test`).
// The layering rules repeat, for the editor, what test/unit/architecture/layers.test.ts enforces;
// inside the page, the stores (state/, runs/) never import views (panels/, dialogs/, grid/, charts/).
import js from '@eslint/js';
import globals from 'globals';
import tseslint from 'typescript-eslint';

const viewFolders = ['panels', 'dialogs', 'grid', 'charts', 'editing'];

export default tseslint.config(
  { ignores: ['out/**', 'dist/**', 'node_modules/**', 'test-results/**', 'samples/generated/**'] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    languageOptions: { ecmaVersion: 2022, sourceType: 'module' },
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
      // A variable that closures read before its one assignment (wiring order) stays `let`.
      'prefer-const': ['error', { ignoreReadBeforeAssign: true }],
    },
  },
  {
    files: ['scripts/**/*.mjs', 'bin/**/*.js', 'bench/**/*.ts', 'test/**/*.ts', 'src-main/**/*.ts', '*.config.*'],
    languageOptions: { globals: { ...globals.node } },
  },
  {
    files: ['bin/**/*.js'],
    languageOptions: { sourceType: 'commonjs' },
    rules: { '@typescript-eslint/no-require-imports': 'off' },
  },
  {
    files: ['src-renderer/**/*.ts'],
    languageOptions: { globals: { ...globals.browser } },
  },
  {
    files: ['src-shared/**/*.ts'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            {
              group: ['node:*', 'electron', 'fs', 'path', 'os', 'worker_threads'],
              message: 'src-shared runs anywhere: no Node or Electron imports.',
            },
            { group: ['**/src-main/**', '**/src-renderer/**'], message: 'src-shared imports only itself.' },
          ],
        },
      ],
    },
  },
  {
    files: ['src-renderer/state/**/*.ts', 'src-renderer/runs/**/*.ts'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            ...viewFolders.map((f) => ({
              group: [`../${f}/*`, `../../${f}/*`],
              message: 'Stores never import views.',
            })),
            {
              group: ['**/src-main/**', 'node:*', 'electron'],
              message: 'The page talks to the main side only through bridge/.',
            },
          ],
        },
      ],
    },
  },
);
