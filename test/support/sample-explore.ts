/**
 * The explore page of a bundled sample, written once per test run by the real command
 * (`explore samples/NAME --out FILE`, through run(argv, io)) and shared by the files that read it:
 * test/explore/page.test.ts (the page as text) and test/explore/browser.test.ts (the page in
 * chromium). Kept in memory per worker thread and in the run's temporary directory for the other
 * thread (test/support/run-once.ts). The page depends on the sample file alone, which no test
 * changes, and the pages under test are opened fresh from the file by each reader.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { runCli } from '../cli/helpers.js';
import { useExploreScript } from './explore-script.js';
import { madeOncePerRun } from './run-once.js';

export interface ExplorePageRun {
  /** The command's exit code and what it wrote to stderr. */
  code: number;
  stderr: string;
  /** The page (--out). */
  out: string;
}

const made = new Map<string, Promise<ExplorePageRun>>();

async function make(sample: string): Promise<ExplorePageRun> {
  const page = sample.replace(/\.yaml$/, '.html');
  const dir = await madeOncePerRun(`explore-page-${sample}`, async (own) => {
    await useExploreScript();
    const r = await runCli(['explore', `samples/${sample}`, '--out', join(own, page)]);
    writeFileSync(join(own, 'result.json'), JSON.stringify({ code: r.code, stderr: r.stderr }));
  });
  const r = JSON.parse(readFileSync(join(dir, 'result.json'), 'utf8')) as { code: number; stderr: string };
  return { ...r, out: join(dir, page) };
}

/** `sample`: a file name in samples/ (e.g. "halpha-narrowband.yaml"). */
export function sampleExplorePage(sample: string): Promise<ExplorePageRun> {
  let p = made.get(sample);
  if (!p) {
    p = make(sample);
    made.set(sample, p);
  }
  return p;
}
