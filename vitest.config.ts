import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['test/**/*.test.ts'],
    // Simulations and the whole-build tests run a few seconds each on a 2-core machine.
    testTimeout: 60_000,
    hookTimeout: 120_000,
    env: { TZ: 'UTC' },
  },
});
