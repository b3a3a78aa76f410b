import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['test/**/*.test.ts'],
    testTimeout: 60_000,
    // The built CLI keeps a sample cache in the user's cache folder by default; tests run without
    // one (the same bytes either way, test/uncertainty/sample-cache.test.ts), and ask for a temporary one.
    env: { SERE_CACHE: 'off' },
  },
});
