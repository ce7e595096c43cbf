/// <reference types="vitest/config" />
import { defineConfig } from 'vite';
import react from '@vitejs/plugin-react';
import tailwindcss from '@tailwindcss/vite';
import { fileURLToPath } from 'node:url';
import LongFirstSequencer from './tests/support/sequencer';

const here = (p: string) => fileURLToPath(new URL(p, import.meta.url));

const alias = {
  '@/': here('./src/'),
  '@server/': here('./server/'),
  '@shared/': here('./shared/'),
};

/**
 * Server test files that assert timings of the server in their own process (event-loop delay under
 * 150 ms, /api/health within 1 s, equal answer times): they run one at a time after the parallel
 * group (project server-timed; `--project 'server*'` selects both server projects).
 */
const SERVER_TIMED = ['tests/server/hostile-documents.test.ts', 'tests/server/fuzz.test.ts', 'tests/server/security-auth.test.ts'];

export default defineConfig({
  plugins: [react(), tailwindcss()],
  resolve: { alias },
  build: { outDir: 'dist', sourcemap: false, chunkSizeWarningLimit: 900 },
  test: {
    // Two test files at a time (vitest's default is one fewer than the cores: a single worker on
    // CI's 2 cores). Most server files wait on I/O, timers or child processes (the kill -9 loop
    // sleeps and restarts a server), so two share the cores well. The server files that measure
    // timings run next, one at a time (group 1, project server-timed), and the browser specs last,
    // one at a time (group 2), while the demo data directory they start from is
    // prepared in the background from the start of the run (tests/e2e/global-setup.ts).
    // TEST_WORKERS overrides the figure.
    maxWorkers: Number(process.env.TEST_WORKERS ?? 2),
    // the long files first (the kill -9 loop), so that they run beside the others (tests/support/sequencer.ts)
    sequence: { sequencer: LongFirstSequencer },
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
          exclude: SERVER_TIMED,
          environment: 'node',
          testTimeout: 30_000,
          hookTimeout: 60_000,
          globalSetup: ['tests/server/global-setup.ts'],
        },
      },
      {
        // the API tests that measure the event loop's delay or answer times (group 1: alone, after
        // the others, so that a neighbour's CPU is not counted as the server's)
        resolve: { alias },
        test: {
          name: 'server-timed',
          include: SERVER_TIMED,
          environment: 'node',
          testTimeout: 30_000,
          hookTimeout: 60_000,
          globalSetup: ['tests/server/global-setup.ts'],
          maxWorkers: 1,
          sequence: { groupOrder: 1 },
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
          // a spec's beforeAll may wait for the demo data directory still being prepared in the
          // background (about 3 min when a spec is run alone; far longer on a crowded machine; the
          // preparation gives up after 25 min of jobs, tests/e2e/prepare-demo.ts)
          hookTimeout: 1_800_000,
          fileParallelism: false,
          maxWorkers: 1,
          sequence: { groupOrder: 2 },
          globalSetup: ['tests/e2e/global-setup.ts'],
        },
      },
    ],
  },
});
