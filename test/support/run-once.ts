/**
 * What several test files need and is costly to make, made once per test run in the run's
 * temporary directory (test/support/global-setup.ts), so that the other worker thread reuses it:
 * the first to ask makes it in a private folder, then renames the folder into place, so a reader
 * never sees half of it. Two threads asking at the same moment both make it, and the second rename
 * keeps the first. Only for things that depend on their name alone (the files in samples/, which
 * no test changes, and the sources).
 */
import { existsSync, renameSync } from 'node:fs';
import { join } from 'node:path';
import { TEST_ROOT_VARIABLE, tempDir } from './temp.js';

/** The run's folder `name` (letters, digits, - and _), made by `make(folder)` unless a thread made it before. */
export async function madeOncePerRun(name: string, make: (dir: string) => Promise<void>): Promise<string> {
  const root = process.env[TEST_ROOT_VARIABLE];
  if (!root) throw new Error(`${TEST_ROOT_VARIABLE} is not set: run the tests through vitest`);
  const shared = join(root, `once-${name.replace(/[^A-Za-z0-9_-]/g, '_')}`);
  if (!existsSync(shared)) {
    const own = tempDir('skytally-once-');
    await make(own);
    try {
      renameSync(own, shared);
    } catch (e) {
      // the other thread renamed its own copy into place first: read that one
      if (!existsSync(shared)) throw e;
    }
  }
  return shared;
}
