import { defineConfig } from 'vitest/config';

// One config for the whole workspace. Workspace packages resolve to their TypeScript sources
// through the "@motorprint/source" export condition, so tests need no build step.
export default defineConfig({
  resolve: { conditions: ['@motorprint/source'] },
  ssr: { resolve: { conditions: ['@motorprint/source'] } },
  test: {
    include: ['packages/*/src/**/*.test.ts'],
    testTimeout: 60_000,
    pool: 'forks',
  },
});
