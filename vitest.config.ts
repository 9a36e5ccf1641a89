import { defineConfig } from 'vitest/config';

// One vitest run over every workspace suite; each project keeps its own config.
export default defineConfig({
  test: {
    projects: ['packages/*', 'apps/api', 'apps/web', 'tests'],
  },
});
