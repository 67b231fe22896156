/**
 * The package as built (scripts/build.mjs, into a temporary copy of the package: package.json,
 * bin/ and the bundles) runs its jobs in worker threads from dist/worker.js, found through the
 * package's "#worker" import with no help from the test set-up (SKYTALLY_WORKER_ENTRY removed):
 * `forecast` mocks and `plan` depth tables with two workers give JSON identical to the sources
 * run in this process with one thread (exact: each block depends on its indices only). The built
 * files are not minified, carry source maps, and never load esbuild.
 */
import { execFile } from 'node:child_process';
import { copyFileSync, existsSync, mkdirSync, readdirSync, readFileSync, symlinkSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { promisify } from 'node:util';
import { beforeAll, describe, expect, test } from 'vitest';
import { WORKER_ENTRY_VARIABLE } from '../../src/parallel/blocks.js';
import { runCli } from '../cli/helpers.js';
import { tempDir } from '../support/temp.js';

const run = promisify(execFile);
let pkg = '';

beforeAll(async () => {
  pkg = tempDir('skytally-built-');
  await run(process.execPath, ['scripts/build.mjs', '--bundle-only', join(pkg, 'dist')]);
  copyFileSync('package.json', join(pkg, 'package.json'));
  mkdirSync(join(pkg, 'bin'));
  copyFileSync('bin/skytally.js', join(pkg, 'bin', 'skytally.js'));
  // Packages left outside the bundle (those with native parts) resolve from here.
  symlinkSync(resolve('node_modules'), join(pkg, 'node_modules'), 'dir');
}, 120_000);

/** The built program in a child process, without the sources' worker entry. */
async function built(args: string[]): Promise<string> {
  const env = { ...process.env };
  delete env[WORKER_ENTRY_VARIABLE];
  const r = await run(process.execPath, [join(pkg, 'bin', 'skytally.js'), ...args], { env, maxBuffer: 64 << 20 });
  return r.stdout;
}

describe('the built package in worker threads', () => {
  test('forecast: 16 mocks in two workers = the sources in one thread', async () => {
    const args = [
      'forecast',
      'samples/halpha-narrowband.yaml',
      '--no-cosmic-variance',
      '--mocks',
      '16',
      '--format',
      'json',
    ];
    const [two, one] = await Promise.all([built([...args, '--workers', '2']), runCli([...args, '--workers', '1'])]);
    expect(one.code).toBe(0);
    expect(JSON.parse(two).mocks.count).toBe(16);
    expect(JSON.parse(two)).toEqual(JSON.parse(one.stdout));
  }, 120_000);
  test('plan: depth tables in two workers = the sources in one thread', async () => {
    // The H-alpha plan sample made small: one tier, 12 exposures.
    const text = readFileSync('samples/plan-halpha-layers.yaml', 'utf8')
      .replace(/exposure_grid: \{[^}]*\}/, 'exposure_grid: {min_hours: 0.5, max_hours: 8, count: 12}')
      .replace('tiers: 2', 'tiers: 1');
    const file = join(tempDir('skytally-built-plan-'), 'plan.yaml');
    writeFileSync(file, text);
    const [two, one] = await Promise.all([
      built(['plan', file, '--workers', '2', '--format', 'json']),
      runCli(['plan', file, '--workers', '1', '--format', 'json']),
    ]);
    expect(one.code).toBe(0);
    expect(JSON.parse(two).designs.length).toBeGreaterThan(0);
    expect(JSON.parse(two)).toEqual(JSON.parse(one.stdout));
  }, 120_000);
  test('the bundles: three entries, source maps, our names kept, no esbuild', () => {
    const dist = join(pkg, 'dist');
    for (const entry of ['index.js', 'worker.js', join('cli', 'skytally.js')])
      expect(existsSync(join(dist, entry)), entry).toBe(true);
    const files = [
      join(dist, 'index.js'),
      join(dist, 'worker.js'),
      join(dist, 'cli', 'skytally.js'),
      ...readdirSync(join(dist, 'chunks'))
        .filter((f) => f.endsWith('.js'))
        .map((f) => join(dist, 'chunks', f)),
    ];
    let all = '';
    for (const f of files) {
      const text = readFileSync(f, 'utf8');
      expect(text, f).toMatch(/\/\/# sourceMappingURL=\S+\.js\.map\s*$/);
      expect(existsSync(`${f}.map`), f).toBe(true);
      expect(text, f).not.toMatch(/\bimport\s*\(\s*["']esbuild["']\s*\)|from\s*["']esbuild["']/);
      all += text;
    }
    // Not minified: functions keep their names and the code its lines.
    expect(all).toMatch(/function runBlocks\(/);
    expect(all).toMatch(/function serveJobs\(/);
    const map = JSON.parse(readFileSync(join(dist, 'worker.js.map'), 'utf8')) as { sources: string[] };
    expect(map.sources.some((s) => s.endsWith('src/worker.ts'))).toBe(true);
  });
});
