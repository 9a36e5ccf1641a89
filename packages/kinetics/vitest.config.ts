import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    name: 'kinetics',
    include: ['src/**/*.test.ts'],
    restoreMocks: true,
  },
});
