import path from 'node:path';
import { defineConfig } from 'vitest/config';

export default defineConfig({
  // The console's `@/` alias, so its unit tests import the same way its code does.
  resolve: { alias: { '@': path.join(import.meta.dirname, 'console/src') } },
  test: {
    globalSetup: ['tests/support/global-setup.ts'],
    include: ['tests/**/*.test.ts', 'console/src/**/*.test.ts'],
    pool: 'forks',
    maxWorkers: 2,
    testTimeout: 60_000,
    hookTimeout: 120_000,
    env: { NODE_ENV: 'test' },
  },
});
