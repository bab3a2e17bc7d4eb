import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { defineConfig } from 'vitest/config';

/*
 * Three projects. `unit` is pure and runs in parallel. `integration` and `e2e` share one database
 * (and the e2e one a running app) per run, so their files run one at a time. Run them through
 * `npm test`, which starts the services they need and sets their settings.
 */

const root = path.dirname(fileURLToPath(import.meta.url));

export default defineConfig({
  resolve: {
    alias: [
      // Next resolves `server-only` to an empty module on the server; outside Next it throws.
      { find: /^server-only$/, replacement: path.join(root, 'node_modules/server-only/empty.js') },
      { find: /^@\//, replacement: `${root}/` },
    ],
  },
  test: {
    root,
    // The pure quality computations must be exercised branch by branch: npm test runs the whole
    // suite with --coverage and fails below these thresholds.
    coverage: {
      provider: 'v8',
      include: ['lib/risk/**', 'lib/weight/**', 'lib/sampling/**', 'lib/clocks/**', 'lib/causes/**'],
      reporter: ['text-summary', 'text'],
      reportsDirectory: '.data/coverage',
      thresholds: { branches: 100 },
    },
    projects: [
      {
        extends: true,
        test: {
          name: 'unit',
          include: ['tests/unit/**/*.test.{ts,tsx}'],
          environment: 'node',
        },
      },
      {
        extends: true,
        test: {
          name: 'integration',
          include: ['tests/integration/**/*.test.{ts,tsx}'],
          environment: 'node',
          setupFiles: ['tests/helpers/setup.ts'],
          fileParallelism: false,
          testTimeout: 30_000,
          hookTimeout: 60_000,
        },
      },
      {
        extends: true,
        test: {
          name: 'e2e',
          include: ['tests/e2e/**/*.test.{ts,tsx}'],
          environment: 'node',
          setupFiles: ['tests/helpers/setup.ts'],
          fileParallelism: false,
          testTimeout: 90_000,
          hookTimeout: 90_000,
        },
      },
    ],
  },
});
