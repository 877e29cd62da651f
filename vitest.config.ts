import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['tests/**/*.test.ts'],
    testTimeout: 60_000,
    // Setup hooks render takes and start a browser: on a loaded machine they need as long as a test.
    hookTimeout: 60_000,
    pool: 'forks',
    reporters: ['default', './tests/helpers/countReporter.ts'],
  },
});
