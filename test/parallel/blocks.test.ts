/**
 * The block runner (src/parallel/blocks.ts) through a small job (block-fixture.ts, served by the
 * worker entry fixture-worker.ts, bundled here as src/worker.ts is by the test set-up): every index
 * is computed once, in worker threads when more than one is asked for, and placed by its block
 * start whatever the number of workers and the block size (exact: i^2 + offset in doubles),
 * progress rises to the total, and a block that throws makes the whole run fail with that block's
 * error, in this thread and in a worker; so does a job the entry does not name or cannot load.
 * Threads start only when the work pays for them: below the break-even every block runs in this
 * thread, above it the first two indices run here (the second timed) and the rest in workers, with
 * the same values.
 * The package's own worker entry is checked by the plan and forecast tests with two workers, and
 * as the package ships it by scripts/check-package.mjs.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { threadId } from 'node:worker_threads';
import { beforeAll, describe, expect, test } from 'vitest';
import {
  WORKER_BREAK_EVEN_MS,
  WORKER_ENTRY_VARIABLE,
  WORKER_MIN_MS_VARIABLE,
  minWorkMs,
  workerEntry,
} from '../../src/parallel/blocks.js';
import { runSquares } from './block-fixture.js';
import { tempDir } from '../support/temp.js';
import { bundleWorkerEntry } from '../support/worker-bundle.js';

const expected = (total: number, offset: number) => Float64Array.from({ length: total }, (_, i) => i * i + offset);

let entry = '';
beforeAll(async () => {
  entry = await bundleWorkerEntry('test/parallel/fixture-worker.ts', tempDir('skytally-fixture-worker-'));
}, 60_000);

describe('runBlocks', () => {
  test.each([
    [1, 7],
    [2, 7],
    [3, 5],
    [2, 1],
  ])(
    '%i worker(s), blocks of %i: every index once, in place; progress rises to the total',
    async (workers, block) => {
      const total = 53;
      const progress: number[] = [];
      const r = await runSquares({
        total,
        block,
        workers,
        entry,
        data: { offset: 0.25, failAt: -1 },
        onProgress: (done, all) => {
          expect(all).toBe(total);
          progress.push(done);
        },
      });
      expect(Array.from(r.values)).toEqual(Array.from(expected(total, 0.25)));
      expect(Array.from(r.flags)).toEqual(Array.from({ length: total }, (_, i) => i % 2));
      expect(r.indices).toBe(total);
      // One thread: all here (the thread running this test: 0 in a process of its own, another id in
      // a test runner's worker thread); more: all in worker threads.
      if (workers === 1) expect([...r.threads]).toEqual([threadId]);
      else expect(r.threads.has(threadId)).toBe(false);
      expect(progress.at(-1)).toBe(total);
      for (let i = 1; i < progress.length; i++) expect(progress[i]!).toBeGreaterThan(progress[i - 1]!);
    },
    60_000,
  );
  test.each([
    ['below the break-even: every block in this thread', 1e9],
    ['above it: the first two indices here (the second timed), the rest in worker threads', 1e-9],
    ['break-even 0: every block in worker threads', 0],
  ])(
    '2 workers, %s; the same values',
    async (_what, minWorkMs) => {
      const total = 29;
      const r = await runSquares({ total, block: 4, workers: 2, entry, minWorkMs, data: { offset: 3.5, failAt: -1 } });
      expect(Array.from(r.values)).toEqual(Array.from(expected(total, 3.5)));
      expect(r.indices).toBe(total);
      if (minWorkMs === 1e9) expect([...r.threads]).toEqual([threadId]);
      else {
        expect(r.threads.size).toBeGreaterThan(minWorkMs > 0 ? 1 : 0);
        expect([...r.threads].some((t) => t !== threadId)).toBe(true);
        expect(r.threads.has(threadId)).toBe(minWorkMs > 0);
      }
    },
    60_000,
  );
  test('the break-even: the job option, else SKYTALLY_WORKER_MIN_MS, else the measured default', () => {
    const given = process.env[WORKER_MIN_MS_VARIABLE];
    try {
      delete process.env[WORKER_MIN_MS_VARIABLE];
      expect(minWorkMs()).toBe(WORKER_BREAK_EVEN_MS);
      expect(minWorkMs(5)).toBe(5);
      process.env[WORKER_MIN_MS_VARIABLE] = '0';
      expect(minWorkMs()).toBe(0);
      expect(minWorkMs(5)).toBe(5);
      process.env[WORKER_MIN_MS_VARIABLE] = 'many';
      expect(minWorkMs()).toBe(WORKER_BREAK_EVEN_MS);
    } finally {
      if (given === undefined) delete process.env[WORKER_MIN_MS_VARIABLE];
      else process.env[WORKER_MIN_MS_VARIABLE] = given;
    }
  });
  test('no index: nothing runs, nothing fails', async () => {
    const r = await runSquares({ total: 0, block: 4, workers: 2, entry, data: { offset: 0, failAt: 0 } });
    expect(r.values.length).toBe(0);
    expect(r.indices).toBe(0);
  });
  test.each([1, 2])(
    '%i worker(s): a block that throws fails the run with its error',
    async (workers) => {
      await expect(
        runSquares({ total: 40, block: 4, workers, entry, data: { offset: 0, failAt: 22 } }),
      ).rejects.toThrow(/index 22 refused/);
    },
    60_000,
  );
  test('a job the worker entry does not name fails the run, naming the job', async () => {
    await expect(
      runSquares({ total: 40, block: 4, workers: 2, entry, job: 'no-such-job', data: { offset: 0, failAt: -1 } }),
    ).rejects.toThrow(/no job named "no-such-job"/);
  }, 60_000);
  test('a job that cannot be loaded fails the run with the loading error', async () => {
    await expect(
      runSquares({ total: 40, block: 4, workers: 2, entry, job: 'test-unloadable', data: { offset: 0, failAt: -1 } }),
    ).rejects.toThrow(/cannot be loaded/);
  }, 60_000);
});

describe('the package worker entry', () => {
  test('from the sources: the bundle named by the test set-up; without it, a clear error', () => {
    const given = process.env[WORKER_ENTRY_VARIABLE];
    expect(given).toMatch(/worker\.mjs$/);
    expect(workerEntry()).toBe(given);
    delete process.env[WORKER_ENTRY_VARIABLE];
    try {
      expect(() => workerEntry()).toThrow(/bundle of src\/worker\.ts/);
    } finally {
      process.env[WORKER_ENTRY_VARIABLE] = given;
    }
  });
  test('src/worker.ts is the only module that serves jobs, and nothing in src/ loads esbuild', () => {
    const files = (dir: string): string[] =>
      readdirSync(dir, { withFileTypes: true }).flatMap((d) =>
        d.isDirectory() ? files(join(dir, d.name)) : d.name.endsWith('.ts') ? [join(dir, d.name)] : [],
      );
    const serving: string[] = [];
    for (const f of files('src')) {
      const text = readFileSync(f, 'utf8');
      if (/\bserveJobs\(/.test(text) && !f.endsWith(join('parallel', 'blocks.ts'))) serving.push(f);
      expect(text, f).not.toMatch(/['"]esbuild['"]/);
    }
    expect(serving).toEqual([join('src', 'worker.ts')]);
  });
});
