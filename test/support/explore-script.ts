/**
 * The explore page's script for runs of the sources (tests, benchmarks): bundled once per test run
 * by scripts/explore-bundle.mjs into the run's temporary directory (test/support/run-once.ts: the
 * other worker thread reuses it) and named in SKYTALLY_EXPLORE_SCRIPT, which
 * src/library/explore/page.ts reads (the built package inlines dist/explore-page.js instead). Only
 * the tests that make pages pay for the bundling.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { bundleExplorePage } from '../../scripts/explore-bundle.mjs';
import { EXPLORE_SCRIPT_VARIABLE } from '../../src/library/explore/page.js';
import { madeOncePerRun } from './run-once.js';

let made: Promise<string> | undefined;

/** Sets SKYTALLY_EXPLORE_SCRIPT to the run's bundle (once per thread); returns the script's text. */
export function useExploreScript(): Promise<string> {
  made ??= (async () => {
    const dir = await madeOncePerRun('explore-script', async (own) => {
      await bundleExplorePage(join(own, 'explore-page.js'));
    });
    const file = join(dir, 'explore-page.js');
    process.env[EXPLORE_SCRIPT_VARIABLE] = file;
    return readFileSync(file, 'utf8');
  })();
  return made;
}
