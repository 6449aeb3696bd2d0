// Lint configuration: type-aware typescript-eslint rules for all TypeScript, plain rules for the
// few JavaScript build files. Formatting is prettier's job (`npm run format`), not eslint's.
import js from '@eslint/js';
import { defineConfig } from 'eslint/config';
import tseslint from 'typescript-eslint';

const typeScriptFiles = ['src/**/*.ts', 'webview/**/*.ts', 'test/**/*.ts', 'bench/**/*.ts', 'demo-data/generator/**/*.ts'];

// The Node globals our JavaScript files use; listed here rather than pulling in another package.
const nodeGlobals = Object.fromEntries(
  ['process', 'console', 'require', 'module', '__dirname', '__filename', 'URL', 'setTimeout', 'clearTimeout', 'Buffer'].map((name) => [
    name,
    'readonly',
  ]),
);

export default defineConfig(
  {
    ignores: ['dist/', 'node_modules/', '.e2e-cache/', 'test-output/', 'runs/', 'demo-data/wind-farm/', '.agents/', '*.vsix'],
  },
  {
    files: typeScriptFiles,
    extends: [js.configs.recommended, tseslint.configs.recommendedTypeChecked],
    languageOptions: {
      parserOptions: { projectService: true, tsconfigRootDir: import.meta.dirname },
    },
    rules: {
      '@typescript-eslint/no-floating-promises': 'error',
      '@typescript-eslint/no-misused-promises': 'error',
      '@typescript-eslint/no-unsafe-argument': 'error',
      '@typescript-eslint/no-unsafe-assignment': 'error',
      '@typescript-eslint/no-unsafe-call': 'error',
      '@typescript-eslint/no-unsafe-member-access': 'error',
      '@typescript-eslint/no-unsafe-return': 'error',
      // A switch over a union must name every member, unless a default branch handles the rest on purpose.
      '@typescript-eslint/switch-exhaustiveness-check': ['error', { considerDefaultExhaustiveForUnions: true }],
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
      eqeqeq: ['error', 'always', { null: 'ignore' }],
    },
  },
  {
    // The engine runs in the CLI and in a worker thread: it must not depend on VS Code or the host.
    files: ['src/engine/**/*.ts'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          paths: [{ name: 'vscode', message: 'Engine code runs outside VS Code; keep vscode in src/host.' }],
          patterns: [{ group: ['**/host', '**/host/**'], message: 'Data flows from the engine to the host, never back.' }],
        },
      ],
    },
  },
  {
    files: ['**/*.js', '**/*.mjs', '**/*.cjs'],
    extends: [js.configs.recommended],
    languageOptions: { globals: nodeGlobals },
  },
);
