/**
 * Mock surveys: draw, fit, summarise.
 *
 * Mock i uses its own Mersenne Twister stream (Matsumoto & Nishimura 1998; @stdlib/random-base-mt19937)
 * seeded with the pair [seed, i] (init_by_array), so a mock's numbers do not depend on which worker
 * runs it nor on how many there are: the same seed gives the same result whatever --workers is.
 * Per slice: g ~ N(0, 1) (only with cosmic variance), mean = N_i max(0, 1 + eps_i),
 * n_i ~ Poisson(mean); then the sources (src/forecast/sampler.ts) and the fit (src/forecast/fit.ts).
 * eps = L g over the slices with a nuisance, L the Cholesky factor of the joint prior's covariance
 * (src/forecast/fisher.ts priorFactor): correlated draws with covariance f_i f_j R_ij. L is lower
 * triangular, so eps_i needs only the g of the slices up to i, each drawn as its slice is reached
 * (with independent slices eps_i = sigma_i g_i).
 *
 * With workers > 1, worker threads run blocks of mocks (src/parallel/blocks.ts): the worker entry
 * (src/worker.ts) names `mockBlocks` as the job 'forecast-mocks'.
 */
import mt19937 from '@stdlib/random-base-mt19937';
import normalRng from '@stdlib/random-base-normal';
import poissonRng from '@stdlib/random-base-poisson';
import type { DensityGrid } from './grid.js';
import { buildSamplingTables, CatalogueSampler, type SamplingTables } from './sampler.js';
import { fitCatalogue, type Estimator } from './fit.js';
import type { PriorFactor } from './fisher.js';
import { runBlocks, type BlockFunction } from '../parallel/blocks.js';
import type { WorkerJob } from '../worker.js';

export interface MockSetup {
  grid: DensityGrid;
  tables: SamplingTables;
  /** Cosmic-variance fraction per slice (zeros when switched off). */
  cvSigma: number[];
  /** The joint prior's factor over the slices with a nuisance (absent without cosmic variance). */
  cvFactor?: PriorFactor;
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
}

export function makeMockSetup(
  grid: DensityGrid,
  cvSigma: number[],
  estimator: Estimator,
  seed: number,
  cvFactor?: PriorFactor,
): MockSetup {
  return { grid, tables: buildSamplingTables(grid), cvSigma, estimator, seed, ...(cvFactor ? { cvFactor } : {}) };
}

/** Run mocks [start, end) in this thread, writing into the arrays at offset 0. */
export function runMockRange(
  setup: MockSetup,
  start: number,
  end: number,
  sampler = new CatalogueSampler(setup.grid, setup.tables),
) {
  const n = end - start;
  const theta = new Float64Array(3 * n);
  const ok = new Uint8Array(n);
  const sources = new Float64Array(n);
  const nS = setup.tables.sliceExpected.length;
  const counts = new Int32Array(nS);
  const cv = setup.cvFactor && setup.cvFactor.active.length > 0 ? setup.cvFactor : undefined;
  const m = cv ? cv.active.length : 0;
  const g = new Float64Array(m);
  for (let i = start; i < end; i++) {
    // The factory's generator carries .normalized (uniform on [0, 1), 53 bits) at run time; its
    // type declaration omits it.
    const rng = mt19937.factory({ seed: new Uint32Array([setup.seed >>> 0, i >>> 0]) }) as unknown as {
      normalized: () => number;
    };
    const rand = rng.normalized;
    const gauss = normalRng.factory(0, 1, { prng: rand });
    const poisson = poissonRng.factory({ prng: rand });
    let c = 0;
    for (let s = 0; s < nS; s++) {
      let factor = 1;
      if (cv && cv.active[c] === s) {
        g[c] = gauss();
        let eps = 0;
        for (let k = 0; k <= c; k++) eps += cv.l[c * m + k]! * g[k]!;
        factor = Math.max(0, 1 + eps);
        c++;
      } else if (!cv) {
        const sigma = setup.cvSigma[s] ?? 0;
        if (sigma > 0) factor = Math.max(0, 1 + sigma * gauss());
      }
      const mean = setup.tables.sliceExpected[s]! * factor;
      counts[s] = mean > 0 ? poisson(mean) : 0;
    }
    const stats = sampler.draw(counts, rand);
    const fit = fitCatalogue(setup.grid, stats, setup.cvSigma, setup.estimator, cv);
    const k = i - start;
    theta[3 * k] = fit.theta[0];
    theta[3 * k + 1] = fit.theta[1];
    theta[3 * k + 2] = fit.theta[2];
    ok[k] = fit.converged ? 1 : 0;
    sources[k] = stats.total;
  }
  return { theta, ok, sources };
}

export interface RunOptions {
  workers?: number;
  onProgress?: (done: number, total: number) => void;
}

/** One block of mocks as a worker returns it. */
type MockBlock = { theta: Float64Array; ok: Uint8Array; sources: Float64Array };

const MOCK_JOB: WorkerJob = 'forecast-mocks';

/** The block function of a setup: one sampler per thread, reused over its blocks. */
export function mockBlocks(setup: MockSetup): BlockFunction<MockBlock> {
  const sampler = new CatalogueSampler(setup.grid, setup.tables);
  return (start, end) => runMockRange(setup, start, end, sampler);
}

/** Run `count` mocks, in this thread (workers <= 1) or in worker threads (src/parallel/blocks.ts). */
export async function runMocks(setup: MockSetup, count: number, opts: RunOptions = {}): Promise<MockRun> {
  const workers = Math.max(1, Math.min(opts.workers ?? 1, count));
  const theta = new Float64Array(3 * count);
  const ok = new Uint8Array(count);
  const sources = new Float64Array(count);
  const block = Math.max(1, Math.min(50, Math.ceil(count / (workers * 8))));
  await runBlocks({
    total: count,
    block,
    workers,
    data: setup,
    prepare: mockBlocks,
    job: MOCK_JOB,
    onBlock: (start, _end, r: MockBlock) => {
      theta.set(r.theta, 3 * start);
      ok.set(r.ok, start);
      sources.set(r.sources, start);
    },
    onProgress: opts.onProgress,
    name: 'mock',
    items: 'mocks',
  });
  return { count, theta, ok, sources };
}
