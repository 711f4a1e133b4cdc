import { defineConfig } from 'vitest/config';
import { fileURLToPath } from 'node:url';

const src = (p: string): string => fileURLToPath(new URL(`./packages/${p}/src/index.ts`, import.meta.url));

export default defineConfig({
  resolve: {
    alias: {
      '@railcheck/core/internal': fileURLToPath(new URL('./packages/core/src/internal.ts', import.meta.url)),
      '@railcheck/devices': src('devices'),
      '@railcheck/core': src('core'),
      '@railcheck/cli': src('cli'),
    },
  },
  test: {
    benchmark: { include: ['bench/**/*.bench.ts'] },
    testTimeout: 60_000,
    // FORCE_SPARSE=1 runs every compiled circuit on the sparse solver (test/helpers/force-sparse.ts).
    setupFiles: process.env.FORCE_SPARSE === '1' ? ['test/helpers/force-sparse.ts'] : [],
    pool: 'threads',
    projects: [
      { extends: true, test: { name: 'main', include: ['test/**/*.test.ts'] } },
      // The transient tests again without the step predictor, the contraction test and the predictive step control (test/helpers/aids-off.ts).
      { extends: true, test: { name: 'aids-off', include: ['test/core/transient/**/*.test.ts', 'test/core/ac/tran-vs-ac.test.ts'], setupFiles: ['test/helpers/aids-off.ts'] } },
    ],
  },
});
