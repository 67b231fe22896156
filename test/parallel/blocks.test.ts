/**
 * The block runner (src/parallel/blocks.ts) through a small job (block-fixture.ts): every index is
 * computed once, in worker threads when more than one is asked for, and placed by its block start whatever the number of workers and the block size
 * (exact: i^2 + offset in doubles), progress rises to the total, and a block that throws makes the
 * whole run fail with that block's error, in this thread and in a worker.
 */
import { describe, expect, test } from 'vitest';
import { runSquares } from './block-fixture.js';

const expected = (total: number, offset: number) => Float64Array.from({ length: total }, (_, i) => i * i + offset);

describe('runBlocks', () => {
  test.each([
    [1, 7],
    [2, 7],
    [3, 5],
    [2, 1],
  ])('%i worker(s), blocks of %i: every index once, in place; progress rises to the total', async (workers, block) => {
    const total = 53;
    const progress: number[] = [];
    const r = await runSquares(total, block, workers, { offset: 0.25, failAt: -1 }, (done, all) => {
      expect(all).toBe(total);
      progress.push(done);
    });
    expect(Array.from(r.values)).toEqual(Array.from(expected(total, 0.25)));
    expect(Array.from(r.flags)).toEqual(Array.from({ length: total }, (_, i) => i % 2));
    expect(r.indices).toBe(total);
    // One thread: all here (thread 0); more: all in worker threads.
    if (workers === 1) expect([...r.threads]).toEqual([0]);
    else expect(r.threads.has(0)).toBe(false);
    expect(progress.at(-1)).toBe(total);
    for (let i = 1; i < progress.length; i++) expect(progress[i]!).toBeGreaterThan(progress[i - 1]!);
  }, 60_000);
  test('no index: nothing runs, nothing fails', async () => {
    const r = await runSquares(0, 4, 2, { offset: 0, failAt: 0 });
    expect(r.values.length).toBe(0);
    expect(r.indices).toBe(0);
  });
  test.each([1, 2])('%i worker(s): a block that throws fails the run with its error', async (workers) => {
    await expect(runSquares(40, 4, workers, { offset: 0, failAt: 22 })).rejects.toThrow(/index 22 refused/);
  }, 60_000);
});
