import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['test/**/*.test.ts'],
    testTimeout: 30_000,
    hookTimeout: 60_000,
    // Two cores everywhere: keep spawned-CLI tests from starving each other.
    maxWorkers: 2,
  },
});
