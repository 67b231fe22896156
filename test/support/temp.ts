/**
 * Temporary directories for tests, all inside the run's own directory (made and removed by
 * test/support/global-setup.ts), so that nothing is left behind in the system's temporary folder.
 */
import { mkdtempSync } from 'node:fs';
import { join } from 'node:path';

export const TEST_ROOT_VARIABLE = 'SKYTALLY_TEST_TMP';

/** A new empty directory whose name starts with `prefix`, removed when the test run ends. */
export function tempDir(prefix = 'skytally-'): string {
  const root = process.env[TEST_ROOT_VARIABLE];
  if (!root)
    throw new Error(
      `${TEST_ROOT_VARIABLE} is not set: run the tests through vitest (vitest.config.ts names the global set-up)`,
    );
  return mkdtempSync(join(root, prefix));
}
