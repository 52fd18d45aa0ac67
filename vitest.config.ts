import { defineConfig } from 'vitest/config';

// Pinned environment: UTC dates everywhere, one worker pool sized for a 2-core machine.
process.env.TZ = 'UTC';

export default defineConfig({
  test: {
    include: ['test/**/*.test.ts'],
    environment: 'node',
    testTimeout: 60_000,
    hookTimeout: 60_000,
    env: { TZ: 'UTC' },
  },
});
