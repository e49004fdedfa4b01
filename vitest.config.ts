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
    // Nothing may write to stdout or stderr but the pino logger: a stray write fails its test (issue 13 item 3).
    setupFiles: ['tests/setup/output-guard.ts'],
  },
});
