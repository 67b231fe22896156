/**
 * The entry of skytally's worker threads (built to dist/worker.js, found through the package's
 * private import "#worker"). src/parallel/blocks.ts starts it for a job named here; the job's
 * module is loaded only in the worker that runs it. Nothing else in the package serves workers,
 * and no module starts or serves them by being imported.
 */
import { serveJobs } from './parallel/blocks.js';

const jobs = {
  'forecast-mocks': async () => (await import('./forecast/mocks.js')).mockBlocks,
  'plan-depth-tables': async () => (await import('./planning/tables.js')).knotBlocks,
};

/** The name of a job this entry serves (BlockJob.job). */
export type WorkerJob = keyof typeof jobs;

serveJobs(jobs);
