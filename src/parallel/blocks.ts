/**
 * Independent index blocks [start, end) of [0, total), run in this thread or over worker threads.
 *
 * A job is a function `prepare(data)` that returns the block function `(start, end) => result`.
 * With one worker (or fewer) the blocks run here, in order, yielding to the event loop between
 * blocks. With more, each worker thread runs the package's worker entry (src/worker.ts, built to
 * dist/worker.js), which serves the jobs it names with `serveJobs`: the worker looks up the job
 * by its name (`BlockJob.job`), receives `data` once (a structured clone, so plain data and typed
 * arrays only), builds its own block function, and is handed the next block whenever it returns
 * one. A result is an object of typed arrays (their buffers are transferred, not copied) and
 * numbers. The first failure terminates every worker.
 *
 * Threads only when they pay: with more than one worker asked for, the first two indices run here,
 * the second timed (the first carries the one-time costs of a cold start: the code's first
 * compilation and the job's lazily built tables, several times an index's own cost); when that
 * time times the indices left is below the break-even (WORKER_BREAK_EVEN_MS, or
 * `minWorkMs`, or the environment variable SKYTALLY_WORKER_MIN_MS; 0 always starts the threads)
 * the rest runs here too, else in worker threads. Starting a worker (a thread, the worker entry
 * and the job's modules loaded, `data` cloned and `prepare` run) costs a fixed time, so two
 * threads finish sooner than one only beyond about twice that time of work (DEVELOPERS.md,
 * "Worker threads", gives the measurement).
 *
 * Which thread runs a block, and in which order blocks finish, must not change a result: each
 * block's numbers have to depend on its indices and `data` only. The caller places each block's
 * result by its `start` (`onBlock`), so the assembled output is the same whatever `workers` is.
 *
 * Where the worker entry is: the package's private import `#worker` (package.json "imports"),
 * so it is found from whichever bundled file runs this code. Running the TypeScript sources
 * (tests, benchmarks), a worker cannot load .ts files quickly, so the environment variable
 * SKYTALLY_WORKER_ENTRY names a JavaScript bundle of src/worker.ts instead (the test set-up,
 * test/support/global-setup.ts, makes one per run).
 */
import { Worker, isMainThread, parentPort, workerData } from 'node:worker_threads';
import { fileURLToPath } from 'node:url';
import { availableParallelism } from 'node:os';

/** What a block returns: typed arrays (transferred between threads) and numbers. */
export type BlockResult = Record<string, ArrayBufferView | number>;

export type BlockFunction<R extends BlockResult> = (start: number, end: number) => R;

export interface BlockJob<D, R extends BlockResult> {
  /** Blocks cover the indices [0, total). */
  total: number;
  /** Indices per block (at least 1). */
  block: number;
  /** Most worker threads; 1 or fewer runs every block in this thread (more: see `minWorkMs`). */
  workers: number;
  /**
   * Work (ms in this thread, estimated from the first index) below which every block runs here
   * whatever `workers` says; default SKYTALLY_WORKER_MIN_MS when set, else WORKER_BREAK_EVEN_MS.
   * 0 starts the threads whenever `workers` > 1 (tests comparing one thread with several).
   */
  minWorkMs?: number | undefined;
  /** Sent once to each worker; also given to `prepare` in this thread. */
  data: D;
  /** Builds the block function from `data` in this thread (workers <= 1). */
  prepare: (data: D) => BlockFunction<R>;
  /** The job's name in the worker entry's table (`serveJobs`); its loader gives the same `prepare`. */
  job: string;
  /** The worker entry (a file path); by default the package's (see above). */
  entry?: string | undefined;
  /** Each block's result, in the order blocks finish. */
  onBlock: (start: number, end: number, result: R) => void;
  /** Indices done so far, after each block. */
  onProgress?: ((done: number, total: number) => void) | undefined;
  /** Words for the error when workers stop early: `${name} workers stopped after 3 of 10 ${items}`. */
  name: string;
  items: string;
}

interface WorkerSetup<D> {
  skytallyJob: string;
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
  let workers = Math.max(1, Math.min(asked, Math.ceil(total / block)));
  let next = 0;
  let here: BlockFunction<R> | undefined;
  const threshold = workers > 1 ? minWorkMs(job.minWorkMs) : 0;
  if (threshold > 0) {
    // The first two indices here, the second timed (the first pays for the cold start): the work
    // left, at that cost, decides whether threads pay.
    here = job.prepare(job.data);
    onBlock(0, 1, here(0, 1));
    onProgress?.(1, total);
    next = 1;
    let perIndex = 0;
    if (total > 1) {
      const t0 = performance.now();
      onBlock(1, 2, here(1, 2));
      perIndex = performance.now() - t0;
      onProgress?.(2, total);
      next = 2;
    }
    if (perIndex * (total - next) < threshold) workers = 1;
    else workers = Math.max(1, Math.min(workers, Math.ceil((total - next) / block)));
    if (next < total) await new Promise((res) => setImmediate(res));
  }
  if (workers === 1) {
    const run = here ?? job.prepare(job.data);
    for (let start = next; start < total; start += block) {
      const end = Math.min(total, start + block);
      onBlock(start, end, run(start, end));
      onProgress?.(end, total);
      if (end < total) await new Promise((res) => setImmediate(res));
    }
    return;
  }
  const entry = job.entry ?? workerEntry();
  const setup: WorkerSetup<D> = { skytallyJob: job.job, data: job.data };
  let done = next;
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

/** How a worker entry finds a job: its name, and a loader of its `prepare` function. */
export type JobTable = Readonly<Record<string, () => Promise<(data: never) => BlockFunction<BlockResult>>>>;

/**
 * The worker side: the top level of a worker entry calls it once with the jobs it serves. It
 * loads the job named in the worker's data, builds the block function and answers every block
 * it is sent. Outside a worker thread started by `runBlocks` it does nothing.
 */
export function serveJobs(jobs: JobTable): void {
  if (isMainThread || !parentPort) return;
  const setup = workerData as WorkerSetup<unknown> | null;
  if (!setup || typeof setup.skytallyJob !== 'string') return;
  const port = parentPort;
  const load = Object.hasOwn(jobs, setup.skytallyJob) ? jobs[setup.skytallyJob] : undefined;
  if (!load) throw new Error(`the worker entry has no job named "${setup.skytallyJob}"`);
  // Blocks sent before the job has loaded wait in the port's queue: it starts with the listener.
  void load()
    .then((prepare) => {
      // runBlocks sent the data that this job's `prepare` takes.
      const run = prepare(setup.data as never);
      port.on('message', (m: { start: number; end: number }) => {
        const result = run(m.start, m.end);
        const reply: BlockReply<BlockResult> = { start: m.start, end: m.end, result };
        port.postMessage(reply, buffersOf(result));
      });
    })
    .catch((err: unknown) => {
      // Rethrown outside the promise, so that the worker fails and runBlocks hears of it.
      setImmediate(() => {
        throw err;
      });
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
 * Work in this thread (ms) below which blocks do not go to worker threads. Idle, the break-even
 * is twice a worker's start (0.35-0.6 s each here); on the shared 2-core machine two threads
 * first beat one at about 5 s of work in one thread (`npm run bench workers`: DEVELOPERS.md,
 * "Worker threads").
 */
export const WORKER_BREAK_EVEN_MS = 5000;

/** Worker threads when the caller names none: up to 4, at most the machine's cores (threads start only beyond the break-even). */
export function defaultWorkers(): number {
  return Math.max(1, Math.min(4, availableParallelism()));
}

/** The environment variable that sets the break-even (ms; 0: threads whenever more than one is asked for). */
export const WORKER_MIN_MS_VARIABLE = 'SKYTALLY_WORKER_MIN_MS';

/** The break-even in force: the job's own, else the environment's (a number >= 0), else the default. */
export function minWorkMs(own?: number): number {
  if (own !== undefined && own >= 0) return own;
  const given = process.env[WORKER_MIN_MS_VARIABLE];
  if (given !== undefined && given.trim() !== '') {
    const v = Number(given);
    if (Number.isFinite(v) && v >= 0) return v;
  }
  return WORKER_BREAK_EVEN_MS;
}

/** The environment variable naming a bundled worker entry (for runs of the TypeScript sources). */
export const WORKER_ENTRY_VARIABLE = 'SKYTALLY_WORKER_ENTRY';

/**
 * The package's worker entry: SKYTALLY_WORKER_ENTRY when set, else the built dist/worker.js found
 * through the package's "imports" map. The TypeScript sources have no built entry of their own.
 */
export function workerEntry(): string {
  const given = process.env[WORKER_ENTRY_VARIABLE];
  if (given) return given;
  if (import.meta.url.endsWith('.ts')) {
    throw new Error(
      `worker threads need a JavaScript worker entry: build the package, or set ${WORKER_ENTRY_VARIABLE} to a bundle of src/worker.ts`,
    );
  }
  return fileURLToPath(import.meta.resolve('#worker'));
}
