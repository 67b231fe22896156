import { defineConfig } from 'vitest/config';
import { LongestFirstSequencer } from './test/support/sequencer.js';
import { FileDurationReporter } from './test/support/duration-reporter.js';

export default defineConfig({
  test: {
    include: ['test/**/*.test.ts'],
    exclude: ['test/bench/**', 'node_modules/**'],
    // One temporary directory per run (removed at its end) and the bundled worker entry.
    globalSetup: ['test/support/global-setup.ts'],
    testTimeout: 60_000,
    // Speed on a 2-core machine: both cores (vitest's default leaves one idle), worker threads, and
    // modules loaded once per worker rather than once per file (no test mocks modules or keeps
    // state between files; the caches in src/ only keep what a fresh computation would give).
    pool: 'threads',
    maxWorkers: 2,
    isolate: false,
    // The longest files first (recorded durations), so that no long file is left to run alone at the end.
    sequence: { sequencer: LongestFirstSequencer },
    // The default reporter for people; a JSON summary that .ci/run turns into one closing line; each
    // file's time for the longest-first order (test/support/duration-reporter.ts).
    reporters: ['default', 'json', new FileDurationReporter()],
    outputFile: { json: 'test-output/vitest-summary.json' },
    // Set-up hooks that make every sample's report and open each in a browser: minutes when the
    // machine is shared and loaded.
    hookTimeout: 600_000,
  },
});
