/**
 * What a command prints for a bundled sample (`predict samples/NAME --format json`, `forecast ...`,
 * `plan ...`), run once per worker through run(argv, io) and shared by the test files that compare
 * against it: test/cli/report.test.ts and test/cli/report-forecast-plan.test.ts (the numbers the
 * figures must draw), test/explore/page.test.ts and test/explore/browser.test.ts (the numbers the
 * explore page must show). The tests run with isolate: false, so the files of one worker share
 * this module.
 *
 * Sharing is sound because such a run depends on its arguments alone: the files in samples/ are
 * never changed by a test, the commands draw with a fixed seed (1 unless given), and nothing is
 * written (arguments naming an output, --out or --figures, are refused here). Each caller still
 * checks the exit code.
 */
import { runCli, type Captured } from '../cli/helpers.js';

const runs = new Map<string, Promise<Captured>>();

/** `argv`: a command, a file in samples/, then options that write nothing (e.g. ['predict', 'samples/x.yaml', '--format', 'json']). */
export function sampleCommand(argv: string[]): Promise<Captured> {
  if (!/^samples\/[^/]+\.yaml$/.test(argv[1] ?? '') || argv.some((a) => a === '--out' || a === '--figures'))
    throw new Error(`sampleCommand: ${argv.join(' ')} is not a command on a sample that writes nothing`);
  const key = JSON.stringify(argv);
  let p = runs.get(key);
  if (!p) {
    p = runCli(argv);
    runs.set(key, p);
  }
  return p;
}
