/**
 * Whole-process timings of the built program (aims: predict --format json under 0.4 s; a report
 * with its figures under 1 s). Run `npm run build` first.
 */
import { execFileSync } from 'node:child_process';
import { join } from 'node:path';
import type { BenchCase } from './run.js';
import { tempDir } from '../support/temp.js';

const node = process.execPath;
const out = join(tempDir('skytally-bench-'), 'report.html');
const run = (args: string[]) => () =>
  execFileSync(node, ['bin/skytally.js', ...args], { stdio: ['ignore', 'ignore', 'inherit'] });

export const cases: BenchCase[] = [
  { name: 'process: node alone (baseline)', run: () => execFileSync(node, ['-e', '0']), repeats: 10 },
  {
    name: 'process: skytally distances --z 0.5,1,2 --format json',
    run: run(['distances', '--z', '0.5,1,2', '--format', 'json']),
    repeats: 10,
  },
  {
    name: 'process: skytally predict mass-limited.yaml --format json',
    run: run(['predict', 'samples/mass-limited.yaml', '--format', 'json']),
    repeats: 10,
  },
  {
    name: 'process: skytally predict halpha-narrowband.yaml --format json',
    run: run(['predict', 'samples/halpha-narrowband.yaml', '--format', 'json']),
    repeats: 10,
  },
  {
    name: 'process: skytally report halpha-narrowband.yaml --out FILE',
    run: run(['report', 'samples/halpha-narrowband.yaml', '--out', out]),
    repeats: 5,
  },
  {
    name: 'process: skytally report deep-continuum.yaml --out FILE',
    run: run(['report', 'samples/deep-continuum.yaml', '--out', out]),
    repeats: 5,
  },
];
