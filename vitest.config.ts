import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['test/**/*.test.ts'],
    exclude: ['test/bench/**', 'node_modules/**'],
    // One temporary directory per run (removed at its end) and the bundled worker entry.
    globalSetup: ['test/support/global-setup.ts'],
    testTimeout: 60_000,
    // The default reporter for people; a JSON summary that .ci/run turns into one closing line.
    reporters: ['default', 'json'],
    outputFile: { json: 'test-output/vitest-summary.json' },
    hookTimeout: 120_000,
  },
});
