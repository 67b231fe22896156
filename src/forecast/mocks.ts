/**
 * Mock surveys: draw, fit, summarise.
 *
 * Mock i uses its own Mersenne Twister stream (Matsumoto & Nishimura 1998; @stdlib/random-base-mt19937)
 * seeded with the pair [seed, i] (init_by_array), so a mock's numbers do not depend on which worker
 * runs it nor on how many there are: the same seed gives the same result whatever --workers is.
 * Per slice: g ~ N(0, 1) (only with cosmic variance), mean = N_i max(0, 1 + sigma_i g),
 * n_i ~ Poisson(mean); then the sources (src/forecast/sampler.ts) and the fit (src/forecast/fit.ts).
 *
 * With workers > 1, worker_threads run blocks of mocks; this same module is the worker's entry
 * (it checks `workerData.skytallyMocks` when loaded in a worker thread).
 */
import { Worker, isMainThread, parentPort, workerData } from 'node:worker_threads';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import mt19937 from '@stdlib/random-base-mt19937';
import normalRng from '@stdlib/random-base-normal';
import poissonRng from '@stdlib/random-base-poisson';
import type { DensityGrid } from './grid.js';
import { buildSamplingTables, CatalogueSampler, type SamplingTables } from './sampler.js';
import { fitCatalogue, type Estimator } from './fit.js';

export interface MockSetup {
  grid: DensityGrid;
  tables: SamplingTables;
  /** Cosmic-variance fraction per slice (zeros when switched off). */
  cvSigma: number[];
  estimator: Estimator;
  seed: number;
}

export interface MockRun {
  count: number;
  /** Offsets per mock, 3 numbers each (NaN where not estimated or failed). */
  theta: Float64Array;
  /** 1 when the fit converged. */
  ok: Uint8Array;
  /** Sources per mock. */
  sources: Float64Array;
  envelopeMisses: number;
}

export function makeMockSetup(grid: DensityGrid, cvSigma: number[], estimator: Estimator, seed: number): MockSetup {
  return { grid, tables: buildSamplingTables(grid), cvSigma, estimator, seed };
}

/** Run mocks [start, end) in this thread, writing into the arrays at offset 0. */
export function runMockRange(setup: MockSetup, start: number, end: number, sampler = new CatalogueSampler(setup.grid, setup.tables)) {
  const n = end - start;
  const theta = new Float64Array(3 * n);
  const ok = new Uint8Array(n);
  const sources = new Float64Array(n);
  const nS = setup.tables.sliceExpected.length;
  const counts = new Int32Array(nS);
  for (let i = start; i < end; i++) {
    // The factory's generator carries .normalized (uniform on [0, 1), 53 bits) at run time; its
    // type declaration omits it.
    const rng = mt19937.factory({ seed: new Uint32Array([setup.seed >>> 0, i >>> 0]) }) as unknown as { normalized: () => number };
    const rand = rng.normalized;
    const gauss = normalRng.factory(0, 1, { prng: rand });
    const poisson = poissonRng.factory({ prng: rand });
    for (let s = 0; s < nS; s++) {
      const sigma = setup.cvSigma[s] ?? 0;
      const factor = sigma > 0 ? Math.max(0, 1 + sigma * gauss()) : 1;
      const mean = setup.tables.sliceExpected[s]! * factor;
      counts[s] = mean > 0 ? poisson(mean) : 0;
    }
    const stats = sampler.draw(counts, rand);
    const fit = fitCatalogue(setup.grid, stats, setup.cvSigma, setup.estimator);
    const k = i - start;
    theta[3 * k] = fit.theta[0];
    theta[3 * k + 1] = fit.theta[1];
    theta[3 * k + 2] = fit.theta[2];
    ok[k] = fit.converged ? 1 : 0;
    sources[k] = stats.total;
  }
  return { theta, ok, sources, envelopeMisses: sampler.envelopeMisses };
}

export interface RunOptions {
  workers?: number;
  onProgress?: (done: number, total: number) => void;
}

/** Run `count` mocks, in this thread (workers <= 1) or in worker threads. */
export async function runMocks(setup: MockSetup, count: number, opts: RunOptions = {}): Promise<MockRun> {
  const workers = Math.max(1, Math.min(opts.workers ?? 1, count));
  const theta = new Float64Array(3 * count);
  const ok = new Uint8Array(count);
  const sources = new Float64Array(count);
  let misses = 0;
  const block = Math.max(1, Math.min(50, Math.ceil(count / (workers * 8))));
  if (workers === 1) {
    const sampler = new CatalogueSampler(setup.grid, setup.tables);
    for (let start = 0; start < count; start += block) {
      const end = Math.min(count, start + block);
      const r = runMockRange(setup, start, end, sampler);
      theta.set(r.theta, 3 * start);
      ok.set(r.ok, start);
      sources.set(r.sources, start);
      opts.onProgress?.(end, count);
      if (end < count) await new Promise((res) => setImmediate(res));
    }
    return { count, theta, ok, sources, envelopeMisses: sampler.envelopeMisses };
  }
  const entry = await workerEntry();
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
      if (next >= count) {
        void w.terminate();
        return;
      }
      const start = next;
      const end = Math.min(count, start + block);
      next = end;
      w.postMessage({ start, end });
    };
    for (let k = 0; k < workers; k++) {
      const w = new Worker(entry, { workerData: { skytallyMocks: true, setup } });
      pool.push(w);
      w.on('message', (m: { start: number; end: number; theta: Float64Array; ok: Uint8Array; sources: Float64Array; misses: number }) => {
        theta.set(m.theta, 3 * m.start);
        ok.set(m.ok, m.start);
        sources.set(m.sources, m.start);
        misses += m.misses;
        done += m.end - m.start;
        opts.onProgress?.(done, count);
        give(w);
      });
      w.on('error', fail);
      w.on('exit', () => {
        alive--;
        if (alive === 0 && !failed) {
          if (done === count) resolve();
          else fail(new Error(`mock workers stopped after ${done} of ${count} mocks`));
        }
      });
      give(w);
    }
  });
  return { count, theta, ok, sources, envelopeMisses: misses };
}

/**
 * This module's own file as the worker entry. When it is a .ts file (tests and benchmarks run the
 * sources), it is first bundled once per process with esbuild (a development dependency) into a
 * temporary .mjs file, because a worker loading TypeScript through a loader takes seconds to start.
 */
let devBundle: Promise<string> | undefined;
async function workerEntry(): Promise<string> {
  const file = fileURLToPath(import.meta.url);
  if (!file.endsWith('.ts')) return file;
  devBundle ??= (async () => {
    const moduleName = 'esbuild'; // not a literal, so that bundling the program leaves it out
    const { build } = (await import(moduleName)) as typeof import('esbuild');
    const out = join(mkdtempSync(join(tmpdir(), 'skytally-mocks-')), 'mock-worker.mjs');
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
    process.once('exit', () => rmSync(dirname(out), { recursive: true, force: true }));
    return out;
  })();
  return devBundle;
}

if (!isMainThread && parentPort && (workerData as { skytallyMocks?: boolean } | null)?.skytallyMocks) {
  const setup = (workerData as { setup: MockSetup }).setup;
  const sampler = new CatalogueSampler(setup.grid, setup.tables);
  const port = parentPort;
  port.on('message', (m: { start: number; end: number }) => {
    const before = sampler.envelopeMisses;
    const r = runMockRange(setup, m.start, m.end, sampler);
    port.postMessage({ start: m.start, end: m.end, theta: r.theta, ok: r.ok, sources: r.sources, misses: sampler.envelopeMisses - before }, [
      r.theta.buffer,
      r.ok.buffer,
      r.sources.buffer,
    ]);
  });
}
