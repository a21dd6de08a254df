import js from '@eslint/js';
import tseslint from 'typescript-eslint';
import globals from 'globals';
import reactHooks from 'eslint-plugin-react-hooks';

export default tseslint.config(
  { ignores: ['dist/**', 'node_modules/**', '.data/**', 'artifacts/**', 'bench/out/**'] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    languageOptions: { globals: { ...globals.node, ...globals.browser } },
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
    },
  },
  {
    files: ['src/**/*.{ts,tsx}'],
    plugins: { 'react-hooks': reactHooks },
    rules: {
      'react-hooks/rules-of-hooks': 'error',
      'react-hooks/exhaustive-deps': 'warn',
    },
  },
  // The numerical engine is pure: it never knows about HTTP, the database, the
  // client or the file system (the command-line front ends excepted).
  {
    files: ['grading/**/*.ts'],
    ignores: ['grading/cli.ts', 'grading/scoring/cli.ts', 'grading/cli/**'],
    rules: {
      'no-restricted-imports': ['error', {
        patterns: [
          { group: ['**/server/**', '**/src/**'], message: 'grading/ must not import server/ or src/.' },
          { group: ['express', 'sequelize', 'pg', 'fs', 'node:fs', 'fs/promises', 'node:fs/promises', 'react'], message: 'grading/ is free of I/O.' },
        ],
      }],
    },
  },
  {
    files: ['src/**/*.{ts,tsx}'],
    rules: {
      'no-restricted-imports': ['error', { patterns: [{ group: ['**/server/**'], message: 'The client talks to the server over HTTP only.' }] }],
    },
  },
);
