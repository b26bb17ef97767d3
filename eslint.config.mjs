// Lint for the whole repository: `npm run lint`, also one item of `npm test`.
// Syntax-only typescript-eslint (no type information) so a run takes seconds, the React
// hooks rules on the client, and import boundaries between the layers.
import { defineConfig } from 'eslint/config';
import tseslint from 'typescript-eslint';
import reactHooks from 'eslint-plugin-react-hooks';

const serverImport = {
  group: ['**/server', '**/server/**'],
  message: 'The client and shared code run in the browser: they must not import server code.',
};

export default defineConfig(
  {
    ignores: [
      'dist/**',
      '**/node_modules/**',
      '.expo/**',
      'coverage/**',
      '.artifacts/**',
      '.pgtest/**',
      '.pgdata/**',
      '.pgbench/**',
      '.data/**',
      'web-build/**',
      'backups/**',
      'tmp/**',
    ],
  },
  {
    // Some files carry directives for core rules not enabled here (no-console, no-control-regex);
    // they are harmless, so an unused directive is not reported.
    linterOptions: { reportUnusedDisableDirectives: 'off' },
  },
  ...tseslint.configs.recommended,
  {
    rules: {
      // An argument kept for its position (Express error handlers, callbacks) is named `_x`.
      '@typescript-eslint/no-unused-vars': [
        'error',
        { argsIgnorePattern: '^_', varsIgnorePattern: '^_', caughtErrorsIgnorePattern: '^_', ignoreRestSiblings: true },
      ],
      // Packages loaded on first use only (heavy WebAssembly, or a test fake without types).
      '@typescript-eslint/no-require-imports': ['error', { allow: ['^heic-decode$', '^s3rver$'] }],
    },
  },
  {
    files: ['app/**/*.{ts,tsx}', 'components/**/*.{ts,tsx}'],
    ...reactHooks.configs.flat.recommended,
  },
  {
    // The classic hook rules (rules-of-hooks, exhaustive-deps) and most of the React Compiler
    // diagnostics stay as recommended. The app is not built with the React Compiler, and these
    // four flag deliberate patterns rather than bugs: a latest-props ref written during render
    // and read by a debounce timer or a pan responder (refs, immutability), a reset in an effect
    // when a selection or a size changes (set-state-in-effect) and react-hook-form's watch()
    // (incompatible-library).
    files: ['app/**/*.{ts,tsx}', 'components/**/*.{ts,tsx}'],
    rules: {
      'react-hooks/refs': 'off',
      'react-hooks/immutability': 'off',
      'react-hooks/set-state-in-effect': 'off',
      'react-hooks/incompatible-library': 'off',
    },
  },
  // Import boundaries. Each `files` block names every pattern its folder must not use,
  // because a later block's no-restricted-imports replaces an earlier one for the same file.
  {
    files: ['shared/**'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            {
              group: ['**/components', '**/components/**', '**/server', '**/server/**', '**/app', '**/app/**'],
              message: 'shared/ is used by the client and the server alike: it imports nothing from components/, server/ or app/.',
            },
          ],
        },
      ],
    },
  },
  {
    files: ['app/**', 'components/**'],
    rules: {
      'no-restricted-imports': ['error', { patterns: [serverImport] }],
    },
  },
  {
    files: ['server/routes/**'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            {
              group: ['./*', '../routes/*'],
              message: 'A route file does not import another route file: move what both need into server/services/.',
            },
          ],
        },
      ],
    },
  },
  {
    files: ['tests/e2e/**', 'tests/support/**'],
    rules: {
      'no-restricted-properties': [
        'error',
        {
          property: 'waitForFunction',
          message: "The app's Content Security Policy refuses the page-side eval that waitForFunction uses: use pageHolds() from tests/support/browser.ts.",
        },
      ],
    },
  },
  {
    // Metro loads its config with require(): CommonJS is the format it reads.
    files: ['metro.config.js'],
    rules: { '@typescript-eslint/no-require-imports': 'off' },
  },
);
