/**
 * A block job for test/parallel/blocks.test.ts: values[i - start] = i^2 + data.offset, and a count
 * of the block's indices and the thread that ran it; the block holding index data.failAt throws.
 * Its worker entry is fixture-worker.ts (bundled by the test, as src/worker.ts is for the sources).
 */
import { threadId } from 'node:worker_threads';
import { runBlocks, type BlockFunction } from '../../src/parallel/blocks.js';

export interface FixtureData {
  offset: number;
  failAt: number;
}

type Squares = { values: Float64Array; flags: Uint8Array; indices: number; thread: number };

export const SQUARES_JOB = 'test-squares';

export function squares(data: FixtureData): BlockFunction<Squares> {
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

export interface SquaresRun {
  total: number;
  block: number;
  workers: number;
  data: FixtureData;
  /** The worker entry (a bundle of fixture-worker.ts). */
  entry: string;
  /** The job's name sent to the workers (SQUARES_JOB unless a test asks for another). */
  job?: string;
  onProgress?: (done: number, total: number) => void;
  /** The break-even of runBlocks (ms); 0 here unless given, so that two workers are two threads. */
  minWorkMs?: number;
}

export async function runSquares(run: SquaresRun) {
  const { total } = run;
  const values = new Float64Array(total);
  const flags = new Uint8Array(total);
  let indices = 0;
  const threads = new Set<number>();
  await runBlocks({
    total,
    block: run.block,
    workers: run.workers,
    data: run.data,
    prepare: squares,
    job: run.job ?? SQUARES_JOB,
    entry: run.entry,
    onBlock: (start, _end, r: Squares) => {
      values.set(r.values, start);
      flags.set(r.flags, start);
      indices += r.indices;
      threads.add(r.thread);
    },
    onProgress: run.onProgress,
    minWorkMs: run.minWorkMs ?? 0,
    name: 'test',
    items: 'squares',
  });
  return { values, flags, indices, threads };
}
