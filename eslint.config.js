import js from '@eslint/js';
import tseslint from 'typescript-eslint';
import reactHooks from 'eslint-plugin-react-hooks';
import globals from 'globals';

export default tseslint.config(
  { ignores: ['**/node_modules/**', '**/dist/**', '.data/**', 'test-artifacts/**', 'console/src/lib/api-types.ts'] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    languageOptions: { globals: { ...globals.node } },
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
      '@typescript-eslint/no-explicit-any': 'off',
    },
  },
  {
    files: ['console/src/**/*.{ts,tsx}'],
    languageOptions: { globals: { ...globals.browser } },
    plugins: { 'react-hooks': reactHooks },
    rules: { 'react-hooks/rules-of-hooks': 'error', 'react-hooks/exhaustive-deps': 'warn' },
  },
  {
    files: ['api/src/engine/**/*.ts'],
    rules: {
      'no-restricted-imports': ['error', { patterns: [
        { group: ['**/routes/**', '**/services/**', '**/db/**', 'express', 'typeorm', 'pg', 'pg-boss'], message: 'The engine is pure: no HTTP, services or database.' },
      ] }],
    },
  },
  {
    files: ['console/src/features/*/**'],
    rules: {
      'no-restricted-imports': ['error', { patterns: [
        { group: ['@/features/**', '../../*/api', '../../*/components/**', '../../*/routes/**', '../../*/lib/**'], message: 'Features never import each other; lift shared code to src/components or src/lib.' },
      ] }],
    },
  },
);
