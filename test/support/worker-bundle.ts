/**
 * A JavaScript bundle of a TypeScript worker entry, for runs of the sources (tests, benchmarks):
 * a worker thread cannot load .ts files quickly, so the entry and everything it imports are
 * bundled with esbuild (a development dependency; the built package never loads it) into one
 * directory, split into chunks so that each job's modules load only in the workers that run it.
 */
import { build } from 'esbuild';
import { join } from 'node:path';

/** Bundles `entry` (a .ts file) into `outDir`; returns the path of the bundled entry. */
export async function bundleWorkerEntry(entry: string, outDir: string, name = 'worker'): Promise<string> {
  await build({
    entryPoints: { [name]: entry },
    outdir: outDir,
    outExtension: { '.js': '.mjs' },
    bundle: true,
    splitting: true,
    format: 'esm',
    platform: 'node',
    target: 'node20',
    sourcemap: true,
    banner: {
      js: "import { createRequire as __workerRequire } from 'node:module'; const require = __workerRequire(import.meta.url);",
    },
    logLevel: 'error',
  });
  return join(outDir, `${name}.mjs`);
}
