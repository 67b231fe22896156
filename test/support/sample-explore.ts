/**
 * The explore page of a bundled sample, written once per worker by the real command
 * (`explore samples/NAME --out FILE`, through run(argv, io)) and shared by the files that read it:
 * test/explore/page.test.ts (the page as text) and test/explore/browser.test.ts (the page in
 * chromium). The page depends on the sample file alone, which no test changes, and the pages
 * under test are opened fresh from the file by each reader.
 */
import { join } from 'node:path';
import { runCli } from '../cli/helpers.js';
import { tempDir } from './temp.js';

export interface ExplorePageRun {
  /** The command's exit code and what it wrote to stderr. */
  code: number;
  stderr: string;
  /** The page (--out). */
  out: string;
}

const made = new Map<string, Promise<ExplorePageRun>>();

/** `sample`: a file name in samples/ (e.g. "halpha-narrowband.yaml"). */
export function sampleExplorePage(sample: string): Promise<ExplorePageRun> {
  let p = made.get(sample);
  if (!p) {
    const out = join(tempDir('skytally-explore-page-'), sample.replace(/\.yaml$/, '.html'));
    p = runCli(['explore', `samples/${sample}`, '--out', out]).then((r) => ({ code: r.code, stderr: r.stderr, out }));
    made.set(sample, p);
  }
  return p;
}
