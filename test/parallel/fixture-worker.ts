/** The worker entry of test/parallel/blocks.test.ts: serves the fixture job and a job that fails to load. */
import { serveJobs } from '../../src/parallel/blocks.js';
import { SQUARES_JOB, squares } from './block-fixture.js';

serveJobs({
  [SQUARES_JOB]: () => Promise.resolve(squares),
  'test-unloadable': () => Promise.reject(new Error('this job cannot be loaded')),
});
