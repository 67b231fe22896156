/**
 * Once per `vitest run`: one temporary directory for the whole run (test/support/temp.ts makes
 * every test's directories inside it), removed at the end, so that no test leaves anything in the
 * system's temporary folder even when it fails; and a bundle of the worker entry (src/worker.ts)
 * there, named in SKYTALLY_WORKER_ENTRY, so that the sources run their jobs in worker threads
 * (src/parallel/blocks.ts). The variables reach the test processes, which start after this.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { WORKER_ENTRY_VARIABLE } from '../../src/parallel/blocks.js';
import { TEST_ROOT_VARIABLE } from './temp.js';
import { bundleWorkerEntry } from './worker-bundle.js';

export default async function setup(): Promise<() => void> {
  const root = mkdtempSync(join(tmpdir(), 'skytally-test-run-'));
  process.env[TEST_ROOT_VARIABLE] = root;
  process.env[WORKER_ENTRY_VARIABLE] = await bundleWorkerEntry('src/worker.ts', join(root, 'worker'));
  return () => rmSync(root, { recursive: true, force: true });
}
