// Writes test/support/durations.json (seconds per test file, longest first) from the last full
// `npm test` run's test-output/file-durations.json (written by test/support/duration-reporter.ts);
// test/support/sequencer.ts starts the longest files first with it. Run after a full run when files
// were added or their cost changed.
import { readFileSync, writeFileSync } from 'node:fs';

const seconds = JSON.parse(readFileSync('test-output/file-durations.json', 'utf8'));
const sorted = Object.fromEntries(Object.entries(seconds).sort((a, b) => b[1] - a[1]));
writeFileSync('test/support/durations.json', `${JSON.stringify(sorted, null, 2)}\n`);
console.log(`test/support/durations.json: ${Object.keys(sorted).length} files`);
