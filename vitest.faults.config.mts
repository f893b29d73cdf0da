import { defineConfig } from 'vitest/config';

// npm run test:faults: kills the server, the worker and the database at set points and asserts on rows,
// files and job states. Runs on a PostgreSQL cluster of its own (FAULTS_PGPORT, default 54338), so that
// killing it disturbs nothing else, and needs a finished `next build` for the web server.
export default defineConfig({
  resolve: { tsconfigPaths: true },
  test: {
    environment: 'node',
    include: ['tests/faults/**/*.test.ts'],
    globalSetup: ['tests/faults/global-setup.ts'],
    setupFiles: ['tests/faults/env.ts'],
    fileParallelism: false,
    testTimeout: 180_000,
    hookTimeout: 180_000,
  },
});
