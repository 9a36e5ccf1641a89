import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    name: 'api',
    include: ['test/**/*.test.ts'],
    restoreMocks: true,
    testTimeout: 20_000,
    hookTimeout: 30_000,
  },
});
