import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['tests/**/*.test.ts'],
    // The browser tests start Chromium and a server; give them room on a 2-core machine.
    testTimeout: 60_000,
    hookTimeout: 60_000,
    pool: 'forks',
  },
});
