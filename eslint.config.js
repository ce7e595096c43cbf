// Lint: TypeScript recommended rules, plus the import direction that keeps the three trees apart:
// shared/ imports nothing from src/ or server/, no framework and no Node built-in (bare or node:);
// server/ never imports src/; src/ never imports server/. Import cycles are checked by
// scripts/check-imports.ts (the second half of `npm run lint`).
import { builtinModules } from 'node:module';
import js from '@eslint/js';
import tseslint from 'typescript-eslint';
import globals from 'globals';

const NODE_ONLY = 'shared/ is plain TypeScript that runs in the browser too: no framework or Node-only imports.';
const frameworkBan = {
  // bare built-ins ('fs', 'crypto', 'fs/promises', ...) as well as node:*
  paths: builtinModules.filter((m) => !m.startsWith('_')).map((name) => ({ name, message: NODE_ONLY })),
  patterns: [
    { group: ['**/src/**', '@/*', '**/server/**', '@server/*'], message: 'shared/ must not import from src/ or server/.' },
    { group: ['react', 'react-dom', 'express', 'drizzle-orm', 'drizzle-orm/*', 'better-auth', 'better-auth/*', 'node:*'], message: NODE_ONLY },
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
  { files: ['server/**/*.ts'], rules: { 'no-restricted-imports': ['error', { patterns: [{ group: ['**/src/**', '@/*'], message: 'server/ must not import the client (src/); shared code goes in shared/.' }] }] } },
  { files: ['src/**/*.{ts,tsx}'], rules: { 'no-restricted-imports': ['error', { patterns: [{ group: ['**/server/**', '@server/*'], message: 'The client talks to the server over HTTP only.' }] }] } },
);
