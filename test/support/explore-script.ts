/**
 * The explore page's script for runs of the sources (tests, benchmarks): bundled once per process
 * by scripts/explore-bundle.mjs into the run's temporary directory and named in
 * SKYTALLY_EXPLORE_SCRIPT, which src/library/explore/page.ts reads (the built package inlines
 * dist/explore-page.js instead). Only the tests that make pages pay for the bundling.
 */
import { join } from 'node:path';
import { bundleExplorePage } from '../../scripts/explore-bundle.mjs';
import { EXPLORE_SCRIPT_VARIABLE } from '../../src/library/explore/page.js';
import { tempDir } from './temp.js';

let made: Promise<string> | undefined;

/** Sets SKYTALLY_EXPLORE_SCRIPT to a fresh bundle (once per process); returns the script's text. */
export function useExploreScript(): Promise<string> {
  made ??= (async () => {
    const file = join(tempDir('skytally-explore-script-'), 'explore-page.js');
    const text = await bundleExplorePage(file);
    process.env[EXPLORE_SCRIPT_VARIABLE] = file;
    return text;
  })();
  return made;
}
