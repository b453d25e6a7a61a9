import { defineConfig } from 'vitest/config';

// Physics tests run FDTD cases of a few seconds each; the machine has 2 cores.
export default defineConfig({
  test: {
    include: ['test/**/*.test.ts'],
    testTimeout: 300_000,
    hookTimeout: 120_000,
    pool: 'forks',
    maxWorkers: 2,
    reporters: ['default'],
  },
});
