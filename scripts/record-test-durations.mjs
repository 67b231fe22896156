// Writes test/support/durations.json (seconds per test file) from the JSON summary of the last full
// `npm test` run (test-output/vitest-summary.json); test/support/sequencer.ts starts the longest
// files first with it. Run after a full run when files were added or their cost changed.
import { readFileSync, writeFileSync } from 'node:fs';
import { relative } from 'node:path';

const summary = JSON.parse(readFileSync('test-output/vitest-summary.json', 'utf8'));
const durations = {};
for (const file of summary.testResults) {
  const name = relative(process.cwd(), file.name).split('\\').join('/');
  durations[name] = Math.round((file.endTime - file.startTime) / 100) / 10;
}
const sorted = Object.fromEntries(Object.entries(durations).sort((a, b) => b[1] - a[1]));
writeFileSync('test/support/durations.json', `${JSON.stringify(sorted, null, 2)}\n`);
console.log(`test/support/durations.json: ${Object.keys(sorted).length} files`);
