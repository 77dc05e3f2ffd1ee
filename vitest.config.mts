// Test runner configuration: unit tests mirror server/src; protocol tests spawn dist/server.js.
import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['test/**/*.test.ts'],
    testTimeout: 20000,
    pool: 'forks',
  },
});
