import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['tests/**/*.test.ts', 'tests/**/*.test.tsx'],
    setupFiles: ['tests/helpers/no-ci-variable.ts'],
    testTimeout: 30_000,
    hookTimeout: 30_000,
    // Several tests start real servers and child processes; two cores do not gain from more forks.
    maxWorkers: 2,
  },
});
