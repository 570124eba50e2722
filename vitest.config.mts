import { defineConfig } from 'vitest/config';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const root = path.dirname(fileURLToPath(import.meta.url));

// One runner for everything that is not the app bundle itself:
//  unit        — pure code (modal/, shared/, server and job units with ioredis-mock)
//  integration — the real server, PostgreSQL, Redis and worker processes (tests/helpers/stack.ts)
//  browser     — Debian Chromium through playwright-core against the built web export
export default defineConfig({
  resolve: { alias: { '@': root } },
  test: {
    projects: [
      {
        extends: true,
        test: {
          name: 'unit',
          include: ['modal/**/*.test.ts', 'shared/**/*.test.ts', 'server/**/*.test.ts', 'jobs/**/*.test.ts', 'db/**/*.test.ts', 'tests/unit/**/*.test.ts'],
          environment: 'node',
          testTimeout: 60_000,
        },
      },
      {
        extends: true,
        test: {
          name: 'integration',
          include: ['tests/integration/**/*.test.ts'],
          environment: 'node',
          testTimeout: 120_000,
          hookTimeout: 120_000,
        },
      },
      {
        extends: true,
        test: {
          name: 'browser',
          include: ['tests/browser/**/*.test.ts'],
          environment: 'node',
          testTimeout: 180_000,
          hookTimeout: 180_000,
          fileParallelism: false,
        },
      },
    ],
  },
});
