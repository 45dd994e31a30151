import { fileURLToPath } from 'node:url';
import { defineConfig } from 'vitest/config';

// One runner for every depth: unit tests beside the code, API tests against a real PostgreSQL
// (tests/api) and browser tests driving Debian's Chromium (tests/e2e). The database-backed
// suites need DATABASE_URL, which `npm test` provides by starting a throwaway server.
export default defineConfig({
  resolve: {
    alias: [{ find: /^@\//, replacement: fileURLToPath(new URL('./frontend/', import.meta.url)) }],
  },
  test: {
    include: ['shared/**/__tests__/**/*.test.ts', 'backend/**/__tests__/**/*.test.ts', 'frontend/**/__tests__/**/*.test.{ts,tsx}', 'tests/**/*.test.ts'],
    globalSetup: ['tests/global-setup.ts'],
    testTimeout: 30_000,
    hookTimeout: 60_000,
    pool: 'forks',
    maxWorkers: 2,
  },
});
