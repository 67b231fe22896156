/**
 * What a command prints for a bundled sample (`predict samples/NAME --format json`, `forecast ...`,
 * `plan ...`), run once per test run through run(argv, io) and shared by the test files that
 * compare against it or check what it prints: the report tests (the numbers the figures must draw),
 * the explore tests (the numbers the page must show), the command tests of each output. Kept in
 * memory per worker thread (the tests run with isolate: false, so the files of one thread share
 * this module) and in the run's temporary directory for the other thread (test/support/run-once.ts).
 *
 * Sharing is sound because such a run depends on its arguments alone: the files in samples/ are
 * never changed by a test, the commands draw with a fixed seed (1 unless given), and nothing is
 * written (arguments naming an output, --out or --figures, are refused here). Each caller still
 * checks the exit code.
 */
import { createHash } from 'node:crypto';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { runCli, type Captured } from '../cli/helpers.js';
import { madeOncePerRun } from './run-once.js';

const runs = new Map<string, Promise<Captured>>();

async function shared(argv: string[], key: string): Promise<Captured> {
  const name = `command-${argv[0]}-${createHash('sha256').update(key).digest('hex').slice(0, 20)}`;
  const dir = await madeOncePerRun(name, async (own) => {
    writeFileSync(join(own, 'result.json'), JSON.stringify({ argv, ...(await runCli(argv)) }));
  });
  const r = JSON.parse(readFileSync(join(dir, 'result.json'), 'utf8')) as Captured & { argv: string[] };
  if (JSON.stringify(r.argv) !== key) throw new Error(`sampleCommand: ${dir} holds another command`);
  return { code: r.code, stdout: r.stdout, stderr: r.stderr };
}

/** `argv`: a command, a file in samples/, then options that write nothing (e.g. ['predict', 'samples/x.yaml', '--format', 'json']). */
export function sampleCommand(argv: string[]): Promise<Captured> {
  if (!/^samples\/[^/]+\.yaml$/.test(argv[1] ?? '') || argv.some((a) => a === '--out' || a === '--figures'))
    throw new Error(`sampleCommand: ${argv.join(' ')} is not a command on a sample that writes nothing`);
  const key = JSON.stringify(argv);
  let p = runs.get(key);
  if (!p) {
    p = shared(argv, key);
    runs.set(key, p);
  }
  return p;
}
