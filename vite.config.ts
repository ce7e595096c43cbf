/// <reference types="vitest/config" />
import { defineConfig } from 'vite';
import react from '@vitejs/plugin-react';
import tailwindcss from '@tailwindcss/vite';
import { fileURLToPath } from 'node:url';

const here = (p: string) => fileURLToPath(new URL(p, import.meta.url));

const alias = {
  '@/': here('./src/'),
  '@server/': here('./server/'),
  '@shared/': here('./shared/'),
};

export default defineConfig({
  plugins: [react(), tailwindcss()],
  resolve: { alias },
  build: { outDir: 'dist', sourcemap: false, chunkSizeWarningLimit: 900 },
  test: {
    projects: [
      {
        resolve: { alias },
        test: {
          name: 'shared',
          include: ['tests/shared/**/*.test.ts', 'tests/golden/**/*.test.ts'],
          environment: 'node',
          testTimeout: 60_000,
        },
      },
      {
        resolve: { alias },
        test: {
          name: 'server',
          include: ['tests/server/**/*.test.ts'],
          environment: 'node',
          testTimeout: 30_000,
          hookTimeout: 60_000,
          globalSetup: ['tests/server/global-setup.ts'],
        },
      },
      {
        // the client's helpers and components, in a browser-like DOM
        plugins: [react()],
        resolve: { alias },
        test: {
          name: 'client',
          include: ['tests/client/**/*.test.{ts,tsx}'],
          environment: 'jsdom',
        },
      },
      {
        resolve: { alias },
        test: {
          name: 'e2e',
          include: ['tests/e2e/**/*.spec.ts'],
          environment: 'node',
          testTimeout: 120_000,
          hookTimeout: 180_000,
          fileParallelism: false,
          globalSetup: ['tests/e2e/global-setup.ts'],
        },
      },
    ],
  },
});
