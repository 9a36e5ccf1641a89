import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    name: 'browser',
    include: ['e2e/**/*.test.ts'],
    globalSetup: ['./support/global-setup.ts'],
    testTimeout: 60_000,
    hookTimeout: 60_000,
    // One Chromium at a time on a 2-core machine.
    fileParallelism: false,
  },
});
