// Lint: TypeScript recommended rules, plus the import direction that keeps the numerical core
// portable: shared/ imports nothing from src/ or server/, and no framework at all.
import js from '@eslint/js';
import tseslint from 'typescript-eslint';
import globals from 'globals';

const frameworkBan = {
  patterns: [
    { group: ['**/src/**', '@/*', '**/server/**', '@server/*'], message: 'shared/ must not import from src/ or server/.' },
    { group: ['react', 'react-dom', 'express', 'drizzle-orm', 'drizzle-orm/*', 'better-auth', 'better-auth/*', 'node:*'], message: 'shared/ is plain TypeScript: no framework or Node-only imports.' },
  ],
};

export default tseslint.config(
  { ignores: ['dist/**', 'node_modules/**', 'data/**', 'test-output/**', 'drizzle/**', '.tmp/**'] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    languageOptions: { globals: { ...globals.node, ...globals.browser } },
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_', caughtErrors: 'none' }],
      '@typescript-eslint/no-explicit-any': 'off',
      'no-empty': ['error', { allowEmptyCatch: true }],
      '@typescript-eslint/no-unused-expressions': ['error', { allowShortCircuit: true, allowTernary: true }],
    },
  },
  { files: ['shared/**/*.ts'], rules: { 'no-restricted-imports': ['error', frameworkBan] } },
  { files: ['src/**/*.{ts,tsx}'], rules: { 'no-restricted-imports': ['error', { patterns: [{ group: ['**/server/**', '@server/*'], message: 'The client talks to the server over HTTP only.' }] }] } },
);
