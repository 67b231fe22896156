/**
 * The report of a bundled sample, made once per test run by the real `report` command
 * (`report samples/NAME --out DIR/report.html --figures DIR/figures`, through run(argv, io)) and
 * shared by the test files that read it: test/cli/report.test.ts checks that its figures draw the
 * numbers of predict, test/render/samples-browser.test.ts opens it in chromium. Making a report is
 * the costly part of both files; the result does not depend on who asks for it.
 *
 * Kept in memory per worker (the tests run with isolate: false, so the files of one worker share
 * it) and in the run's temporary directory for the other worker (test/support/run-once.ts: made in
 * a private folder, then renamed into place, so a reader never sees half a report).
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { runCli, type Captured } from '../cli/helpers.js';
import { madeOncePerRun } from './run-once.js';

export interface SampleReport {
  /** The report command's exit code and what it wrote to stdout and stderr. */
  result: Captured;
  /** The HTML report (--out). */
  html: string;
  /** The --figures folder. */
  figures: string;
}

const made = new Map<string, Promise<SampleReport>>();

function paths(dir: string): Omit<SampleReport, 'result'> {
  return { html: join(dir, 'report.html'), figures: join(dir, 'figures') };
}

async function make(sample: string): Promise<SampleReport> {
  const dir = await madeOncePerRun(`sample-report-${sample}`, async (own) => {
    const at = paths(own);
    // SVG only: the tests read the figures' SVG (PNG is tested in test/cli/report.test.ts and
    // test/render/write-figures.test.ts; rasterising every sample's figures costs 0.4 s a report)
    const result = await runCli(['report', `samples/${sample}`, '--out', at.html, '--figures', at.figures, '--no-png']);
    writeFileSync(join(own, 'result.json'), JSON.stringify(result));
  });
  return { result: JSON.parse(readFileSync(join(dir, 'result.json'), 'utf8')) as Captured, ...paths(dir) };
}

/** `sample`: a file name in samples/ (e.g. "deep-continuum.yaml"). */
export function sampleReport(sample: string): Promise<SampleReport> {
  let p = made.get(sample);
  if (!p) {
    p = make(sample);
    made.set(sample, p);
  }
  return p;
}

/**
 * A survey title holding HTML and script (tags, quotes, an ampersand, an end of SVG and event
 * handlers that would set window.__pwned): halpha-narrowband.yaml with this title.
 */
export const HOSTILE_TITLE = `Field <script>window.__pwned = 1</script> "><img src=x onerror="window.__pwned=2"> & </svg><script>window.__pwned=3</script>`;

export interface HostileReport {
  /** The report command's exit code and what it wrote to stdout and stderr. */
  result: Captured;
  /** The survey file's text (the sample with HOSTILE_TITLE). */
  text: string;
  /** The HTML report (`report FILE --out DIR/report.html`). */
  html: string;
}

let hostile: Promise<HostileReport> | undefined;

/**
 * The report of the sample with HOSTILE_TITLE, made once per run by the real command and shared by
 * test/cli/report.test.ts (the title escaped in the HTML) and test/render/samples-browser.test.ts
 * (shown as text and never run in chromium).
 */
export function hostileTitleReport(): Promise<HostileReport> {
  const text = readFileSync('samples/halpha-narrowband.yaml', 'utf8').replace(
    /^title:.*$/m,
    `title: '${HOSTILE_TITLE}'`,
  );
  hostile ??= madeOncePerRun('hostile-title-report', async (own) => {
    writeFileSync(join(own, 'hostile.yaml'), text);
    const result = await runCli(['report', join(own, 'hostile.yaml'), '--out', join(own, 'report.html')]);
    writeFileSync(join(own, 'result.json'), JSON.stringify(result));
  }).then((dir) => ({
    result: JSON.parse(readFileSync(join(dir, 'result.json'), 'utf8')) as Captured,
    text,
    html: join(dir, 'report.html'),
  }));
  return hostile;
}
