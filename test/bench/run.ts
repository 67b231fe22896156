/**
 * Benchmarks: `npm run bench [filter]`. Each file test/bench/*.bench.ts exports
 * `cases: BenchCase[]`; this runner times each case (median of repeated runs: wall time, and the
 * process's CPU time, user + system, which the machine's load disturbs less) and prints a table.
 * No timing is asserted anywhere: these are figures to report, not tests.
 */
import { readdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import setupTestRun from '../support/global-setup.js';

export interface BenchCase {
  name: string;
  /** One run of the thing measured (a promise it returns is awaited). */
  run: () => unknown;
  /** How many timed runs (default 50); a warm-up run always comes first. */
  repeats?: number;
}

const here = dirname(fileURLToPath(import.meta.url));
const filter = process.argv[2] ?? '';
const files = readdirSync(here)
  .filter((f) => f.endsWith('.bench.ts'))
  .sort();
const rows: string[] = [];
// The tests' set-up: one temporary directory for the run (removed at the end) and the worker entry.
const teardown = await setupTestRun();
try {
  for (const f of files) {
    const mod = (await import(pathToFileURL(join(here, f)).href)) as { cases: BenchCase[] };
    for (const c of mod.cases) {
      if (filter && !c.name.includes(filter) && !f.includes(filter)) continue;
      await c.run();
      const times: number[] = [];
      const cpu: number[] = [];
      const n = c.repeats ?? 50;
      for (let i = 0; i < n; i++) {
        const c0 = process.cpuUsage();
        const t0 = performance.now();
        await c.run();
        times.push(performance.now() - t0);
        const dc = process.cpuUsage(c0);
        cpu.push((dc.user + dc.system) / 1000);
      }
      times.sort((a, b) => a - b);
      cpu.sort((a, b) => a - b);
      const med = times[Math.floor(n / 2)]!;
      const p90 = times[Math.min(n - 1, Math.floor(n * 0.9))]!;
      const cpuMed = cpu[Math.floor(n / 2)]!;
      const line = `${c.name.padEnd(60)} median ${med.toFixed(3).padStart(10)} ms   p90 ${p90.toFixed(3).padStart(10)} ms   CPU median ${cpuMed.toFixed(3).padStart(9)} ms   (n=${n})`;
      rows.push(line);
      console.log(line);
    }
  }
} finally {
  teardown();
}
if (rows.length === 0) console.log('no benchmark matched');
