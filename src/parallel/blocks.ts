/**
 * Independent index blocks [start, end) of [0, total), run in this thread or over worker threads.
 *
 * A job is a function `prepare(data)` that returns the block function `(start, end) => result`.
 * With one worker (or fewer) the blocks run here, in order, yielding to the event loop between
 * blocks. With more, each worker thread loads the CALLER's module (`module`, its import.meta.url),
 * whose top level must call `serveBlocks(tag, prepare)`: the worker receives `data` once (a
 * structured clone, so plain data and typed arrays only), builds its own block function, and is
 * handed the next block whenever it returns one. A result is an object of typed arrays (their
 * buffers are transferred, not copied) and numbers. The first failure terminates every worker.
 *
 * Which thread runs a block, and in which order blocks finish, must not change a result: each
 * block's numbers have to depend on its indices and `data` only. The caller places each block's
 * result by its `start` (`onBlock`), so the assembled output is the same whatever `workers` is.
 */
import { Worker, isMainThread, parentPort, workerData } from 'node:worker_threads';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

/** What a block returns: typed arrays (transferred between threads) and numbers. */
export type BlockResult = Record<string, ArrayBufferView | number>;

export type BlockFunction<R extends BlockResult> = (start: number, end: number) => R;

export interface BlockJob<D, R extends BlockResult> {
  /** Blocks cover the indices [0, total). */
  total: number;
  /** Indices per block (at least 1). */
  block: number;
  /** Worker threads; 1 or fewer runs every block in this thread. */
  workers: number;
  /** Sent once to each worker; also given to `prepare` in this thread. */
  data: D;
  /** Builds the block function from `data` (once in this thread, or once per worker). */
  prepare: (data: D) => BlockFunction<R>;
  /** The caller's module URL (import.meta.url); its top level calls `serveBlocks(tag, prepare)`. */
  module: string;
  /** Tells the worker which `serveBlocks` call answers (one module may serve several jobs). */
  tag: string;
  /** Each block's result, in the order blocks finish. */
  onBlock: (start: number, end: number, result: R) => void;
  /** Indices done so far, after each block. */
  onProgress?: ((done: number, total: number) => void) | undefined;
  /** Words for the error when workers stop early: `${name} workers stopped after 3 of 10 ${items}`. */
  name: string;
  items: string;
}

interface WorkerSetup<D> {
  skytallyBlocks: string;
  data: D;
}

interface BlockReply<R> {
  start: number;
  end: number;
  result: R;
}

/** Run every block of `job`; resolves when all results have been handed to `onBlock`. */
export async function runBlocks<D, R extends BlockResult>(job: BlockJob<D, R>): Promise<void> {
  const { total, onBlock, onProgress } = job;
  const block = Number.isFinite(job.block) ? Math.max(1, Math.floor(job.block)) : 1;
  const asked = Number.isFinite(job.workers) ? Math.floor(job.workers) : 1;
  const workers = Math.max(1, Math.min(asked, Math.ceil(total / block)));
  if (workers === 1) {
    const run = job.prepare(job.data);
    for (let start = 0; start < total; start += block) {
      const end = Math.min(total, start + block);
      onBlock(start, end, run(start, end));
      onProgress?.(end, total);
      if (end < total) await new Promise((res) => setImmediate(res));
    }
    return;
  }
  const entry = await workerEntry(job.module);
  const setup: WorkerSetup<D> = { skytallyBlocks: job.tag, data: job.data };
  let next = 0;
  let done = 0;
  await new Promise<void>((resolve, reject) => {
    let alive = workers;
    let failed = false;
    const pool: Worker[] = [];
    const fail = (err: unknown) => {
      if (failed) return;
      failed = true;
      for (const w of pool) void w.terminate();
      reject(err instanceof Error ? err : new Error(String(err)));
    };
    const give = (w: Worker) => {
      if (next >= total) {
        void w.terminate();
        return;
      }
      const start = next;
      const end = Math.min(total, start + block);
      next = end;
      w.postMessage({ start, end });
    };
    for (let k = 0; k < workers; k++) {
      const w = new Worker(entry, { workerData: setup });
      pool.push(w);
      w.on('message', (m: BlockReply<R>) => {
        if (failed) return;
        try {
          onBlock(m.start, m.end, m.result);
          done += m.end - m.start;
          onProgress?.(done, total);
        } catch (err) {
          fail(err);
          return;
        }
        give(w);
      });
      w.on('error', fail);
      w.on('exit', () => {
        alive--;
        if (alive === 0 && !failed) {
          if (done === total) resolve();
          else fail(new Error(`${job.name} workers stopped after ${done} of ${total} ${job.items}`));
        }
      });
      give(w);
    }
  });
}

/**
 * The worker side: call at the top level of the module named in `BlockJob.module`. In the main
 * thread, or in a worker started for another tag, it does nothing.
 */
export function serveBlocks<D, R extends BlockResult>(tag: string, prepare: (data: D) => BlockFunction<R>): void {
  if (isMainThread || !parentPort) return;
  const setup = workerData as WorkerSetup<D> | null;
  if (!setup || setup.skytallyBlocks !== tag) return;
  const run = prepare(setup.data);
  const port = parentPort;
  port.on('message', (m: { start: number; end: number }) => {
    const result = run(m.start, m.end);
    const reply: BlockReply<R> = { start: m.start, end: m.end, result };
    port.postMessage(reply, buffersOf(result));
  });
}

function buffersOf(result: BlockResult): ArrayBuffer[] {
  const out = new Set<ArrayBuffer>();
  for (const v of Object.values(result)) {
    if (typeof v !== 'number' && v.buffer instanceof ArrayBuffer) out.add(v.buffer);
  }
  return [...out];
}

/**
 * The worker's entry for a module URL. A .js file (the built program) is loaded as it is. A .ts
 * file (tests and benchmarks run the sources) is first bundled once per process with esbuild (a
 * development dependency) into a temporary .mjs file, because a worker loading TypeScript through
 * a loader takes seconds to start.
 */
const devBundles = new Map<string, Promise<string>>();
async function workerEntry(moduleUrl: string): Promise<string> {
  const file = fileURLToPath(moduleUrl);
  if (!file.endsWith('.ts')) return file;
  let bundle = devBundles.get(file);
  if (!bundle) {
    bundle = (async () => {
      const moduleName = 'esbuild'; // not a literal, so that bundling the program leaves it out
      const { build } = (await import(moduleName)) as typeof import('esbuild');
      const out = join(mkdtempSync(join(tmpdir(), 'skytally-workers-')), 'worker.mjs');
      process.once('exit', () => rmSync(dirname(out), { recursive: true, force: true }));
      await build({
        entryPoints: [file],
        outfile: out,
        bundle: true,
        format: 'esm',
        platform: 'node',
        target: 'node20',
        banner: { js: "import { createRequire as __req } from 'node:module'; const require = __req(import.meta.url);" },
        logLevel: 'error',
      });
      return out;
    })();
    devBundles.set(file, bundle);
  }
  return bundle;
}
