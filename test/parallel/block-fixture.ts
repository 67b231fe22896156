/**
 * A block job for test/parallel/blocks.test.ts: values[i - start] = i^2 + data.offset, and a count
 * of the block's indices and the thread that ran it; the block holding index data.failAt throws. This module is also the
 * workers' entry (its last line).
 */
import { threadId } from 'node:worker_threads';
import { runBlocks, serveBlocks, type BlockFunction } from '../../src/parallel/blocks.js';

export interface FixtureData {
  offset: number;
  failAt: number;
}

type Squares = { values: Float64Array; flags: Uint8Array; indices: number; thread: number };

const TAG = 'test-squares';

function squares(data: FixtureData): BlockFunction<Squares> {
  return (start, end) => {
    if (data.failAt >= start && data.failAt < end) throw new Error(`index ${data.failAt} refused`);
    const values = new Float64Array(end - start);
    const flags = new Uint8Array(end - start);
    for (let i = start; i < end; i++) {
      values[i - start] = i * i + data.offset;
      flags[i - start] = i % 2;
    }
    return { values, flags, indices: end - start, thread: threadId };
  };
}

export async function runSquares(total: number, block: number, workers: number, data: FixtureData, onProgress?: (done: number, total: number) => void) {
  const values = new Float64Array(total);
  const flags = new Uint8Array(total);
  let indices = 0;
  const threads = new Set<number>();
  await runBlocks({
    total,
    block,
    workers,
    data,
    prepare: squares,
    module: import.meta.url,
    tag: TAG,
    onBlock: (start, _end, r: Squares) => {
      values.set(r.values, start);
      flags.set(r.flags, start);
      indices += r.indices;
      threads.add(r.thread);
    },
    onProgress,
    name: 'test',
    items: 'squares',
  });
  return { values, flags, indices, threads };
}

serveBlocks(TAG, squares);
