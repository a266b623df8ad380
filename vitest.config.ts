import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['tests/**/*.test.ts', 'tests/**/*.test.tsx'],
    // dist/ is built first: tests that start the command or a worker thread run the build. Temporary files go
    // under one folder of the run, removed at its end.
    globalSetup: ['tests/helpers/build-dist.ts', 'tests/helpers/test-tmpdir.ts'],
    setupFiles: ['tests/helpers/no-ci-variable.ts'],
    testTimeout: 30_000,
    hookTimeout: 30_000,
    // Several tests start real servers and child processes; two cores do not gain from more forks.
    maxWorkers: 2,
  },
});
