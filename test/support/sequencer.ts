/**
 * The order in which vitest hands test files to its two workers. Each file is one task taken by
 * the next free worker, so the run ends when the last file ends: starting the longest files first
 * (the longest-processing-time rule of list scheduling; Graham 1969, "Bounds on multiprocessing
 * timing anomalies") keeps both workers busy to the end. vitest's own order uses the durations of
 * earlier runs it cached in node_modules, which a fresh clone (CI) does not have, and then falls
 * back to file size, which says little about time here (a 90-line test can spawn 2,000 processes).
 * So the durations of a recorded run are kept in test/support/durations.json (seconds per file,
 * refreshed with `node scripts/record-test-durations.mjs` after a full run); files not listed
 * there (new ones) run first, in vitest's order, since their time is unknown.
 */
import { readFileSync } from 'node:fs';
import { relative } from 'node:path';
import { BaseSequencer, type TestSpecification } from 'vitest/node';

const recorded = JSON.parse(readFileSync(new URL('./durations.json', import.meta.url), 'utf8')) as Record<
  string,
  number
>;

export class LongestFirstSequencer extends BaseSequencer {
  override async sort(files: TestSpecification[]): Promise<TestSpecification[]> {
    const base = await super.sort(files);
    const root = this.ctx.config.root;
    const seconds = (f: TestSpecification): number =>
      recorded[relative(root, f.moduleId).split('\\').join('/')] ?? Infinity;
    // Array.prototype.sort is stable: equal weights (the unknown files) keep vitest's order.
    return [...base].sort((a, b) => seconds(b) - seconds(a));
  }
}
