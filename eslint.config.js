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
    // The way from a spec to the wasm core (starts, targets, line taps, DRAG pulses, the rules
    // that stop starts) must give the same bits in every engine: Math's elementary functions
    // differ between engines in the last bit, so these files use src/core/portable-math.ts.
    files: ['src/core/start.ts', 'src/core/encode.ts', 'src/core/run.ts', 'src/core/best-start.ts', 'src/core/line-kernel.ts', 'src/core/drag.ts'],
    rules: {
      'no-restricted-properties': ['error', ...['sin', 'cos', 'tan', 'exp', 'expm1', 'log', 'log1p', 'log2', 'log10', 'pow', 'tanh', 'atanh', 'sinh', 'cosh', 'asin', 'acos', 'atan', 'atan2', 'cbrt'].map((property) => ({
        object: 'Math',
        property,
        message: 'engines differ in its last bit; use src/core/portable-math.ts on the way from a spec to the core',
      }))],
    },
  },
  {
    files: ['**/*.svelte', '**/*.svelte.ts'],
    languageOptions: {
      parserOptions: { projectService: false, extraFileExtensions: ['.svelte'], parser: tseslint.parser, svelteConfig },
    },
  },
);
