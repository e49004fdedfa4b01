import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['tests/**/*.test.ts'],
    environment: 'node',
    testTimeout: 30_000,
    hookTimeout: 60_000,
    // Dates are pinned per test; a non-UTC zone makes time-zone bugs show (conventions §2).
    env: { TZ: 'America/Denver' },
    pool: 'forks',
  },
});
