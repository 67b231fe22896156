// Records the V8 code caches of the program's CommonJS bundles (dist/cli/skytally.cjs.cache and
// dist/vega.cjs.cache; see src/cli/code-cache.ts): runs the program, in this one process, over a
// few samples with the commands most runs use, then on exit writes the bytecode of every function
// compiled by then. Run by scripts/build.mjs after bundling; the outputs go to a temporary
// directory and are removed.
import { mkdtempSync, rmSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';

process.env.SKYTALLY_WRITE_CODE_CACHE = '1';
const require = createRequire(import.meta.url);
const { loadCached } = require('../dist/cli/code-cache.cjs');
const { run } = loadCached(resolve('dist/cli/skytally.cjs')).exports;

const dir = mkdtempSync(join(tmpdir(), 'skytally-code-cache-'));
const io = { stdout: () => true, stderr: () => true, cwd: process.cwd(), stderrIsTTY: false };
const runs = [];
for (const sample of ['deep-continuum', 'halpha-narrowband', 'mass-limited', 'plan-uv-deep-wide']) {
  const file = `samples/${sample}.yaml`;
  runs.push(['check', file], ['check', file, '--format', 'json', '--out', join(dir, 'check.json')]);
  runs.push(['predict', file], ['predict', file, '--format', 'json', '--out', join(dir, 'predict.json')]);
  if (sample !== 'mass-limited') runs.push(['forecast', file, '--format', 'json', '--out', join(dir, 'forecast.json')]);
  if (sample.startsWith('plan-')) runs.push(['plan', file, '--format', 'json', '--out', join(dir, 'plan.json')]);
}
// plans with tiers (the H-alpha layers) and ranked over the model's draws (the robust UV slope)
for (const sample of ['plan-halpha-layers', 'plan-robust-uv-slope'])
  runs.push(['plan', `samples/${sample}.yaml`, '--format', 'json', '--out', join(dir, 'plan.json')]);
// reports drawing every kind of figure: the plan, the model's bands (mass-limited), several
// populations with their shares (narrowband-interlopers), magnitudes (deep-continuum)
for (const sample of [
  'plan-uv-deep-wide',
  'halpha-narrowband',
  'mass-limited',
  'narrowband-interlopers',
  'deep-continuum',
])
  runs.push(['report', `samples/${sample}.yaml`, '--out', join(dir, 'report.html')]);
try {
  for (const argv of runs) {
    const code = await run(argv, io);
    if (code !== 0) throw new Error(`code cache: skytally ${argv.join(' ')} ended with ${code}`);
  }
} finally {
  rmSync(dir, { recursive: true, force: true });
}
