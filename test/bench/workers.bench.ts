/**
 * Where worker threads pay (src/parallel/blocks.ts, WORKER_BREAK_EVEN_MS): the sample H-alpha
 * survey's mocks (about 600 sources each, drawn and fitted) in one thread and in two threads
 * forced (SKYTALLY_WORKER_MIN_MS=0, so that the threads start whatever the work), for a growing
 * number of mocks; and the plan sample's depth tables the same way. The break-even is the work in
 * one thread at which two threads finish as soon: twice a worker's start (the thread, the worker
 * entry and the job's modules, the data cloned, the job prepared). `npm run bench workers`.
 */
import type { BenchCase } from './run.js';
import { fileURLToPath } from 'node:url';
import { loadSurveyFile } from '../../src/survey/load.js';
import { forecast } from '../../src/forecast/forecast.js';
import { plan } from '../../src/library/plan.js';
import { WORKER_MIN_MS_VARIABLE } from '../../src/parallel/blocks.js';

const line = loadSurveyFile(fileURLToPath(new URL('../../samples/halpha-narrowband.yaml', import.meta.url)));
const uv = loadSurveyFile(fileURLToPath(new URL('../../samples/plan-uv-deep-wide.yaml', import.meta.url)));

/** Runs `f` with the break-even forced to 0 (threads always start when more than one is asked for). */
async function forced<T>(f: () => Promise<T>): Promise<T> {
  const given = process.env[WORKER_MIN_MS_VARIABLE];
  process.env[WORKER_MIN_MS_VARIABLE] = '0';
  try {
    return await f();
  } finally {
    if (given === undefined) delete process.env[WORKER_MIN_MS_VARIABLE];
    else process.env[WORKER_MIN_MS_VARIABLE] = given;
  }
}

let sink = 0;
const mocks = (n: number, workers: number) => async () => {
  const r = await forced(() => forecast(line, { cosmicVariance: false, mocks: n, workers, seed: 3 }));
  sink += r.mocks!.failed_fits;
};

export const cases: BenchCase[] = [
  ...[2, 40, 640, 1280, 2560].flatMap((n) => [
    { name: `workers: ${n} mocks (halpha), 1 thread`, run: mocks(n, 1), repeats: n > 600 ? 3 : 5 },
    { name: `workers: ${n} mocks (halpha), 2 threads forced`, run: mocks(n, 2), repeats: n > 600 ? 3 : 5 },
  ]),
  {
    name: 'workers: plan-uv-deep-wide, 1 thread',
    run: () => forced(() => plan(uv, { workers: 1 })),
    repeats: 3,
  },
  {
    name: 'workers: plan-uv-deep-wide, 2 threads forced',
    run: () => forced(() => plan(uv, { workers: 2 })),
    repeats: 3,
  },
];
export const _sink = () => sink;
