// Lint settings: typescript-eslint's recommended rules over src, tests and bench, and
// eslint-plugin-svelte's recommended rules over the app's components (TypeScript inside).
import js from '@eslint/js';
import tseslint from 'typescript-eslint';
import svelte from 'eslint-plugin-svelte';
import globals from 'globals';
import svelteConfig from './svelte.config.js';

export default tseslint.config(
  { ignores: ['node_modules/', 'dist/', 'dist.*/', 'build/', 'assembly/', 'test-results/'] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  ...svelte.configs.recommended,
  {
    languageOptions: { globals: { ...globals.browser, ...globals.node } },
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
    },
  },
  {
    files: ['**/*.svelte', '**/*.svelte.ts'],
    languageOptions: {
      parserOptions: { projectService: false, extraFileExtensions: ['.svelte'], parser: tseslint.parser, svelteConfig },
    },
  },
);
