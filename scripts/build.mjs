// Build: `tsc` emits dist/ (the typed library), then esbuild bundles the command-line program
// into dist/cli/ with one chunk per lazily loaded module, so that start-up reads a few files
// instead of hundreds (mathjs alone is ~2 s unbundled on this machine).
import { execFileSync } from 'node:child_process';
import { rmSync } from 'node:fs';
import { build } from 'esbuild';

rmSync('dist', { recursive: true, force: true });
execFileSync(process.execPath, ['node_modules/typescript/bin/tsc', '-p', 'tsconfig.build.json'], { stdio: 'inherit' });
rmSync('dist/cli', { recursive: true, force: true });
await build({
  entryPoints: { skytally: 'src/cli/main.ts' },
  outdir: 'dist/cli',
  bundle: true,
  splitting: true,
  format: 'esm',
  platform: 'node',
  target: 'node20',
  minify: true,
  legalComments: 'none',
  chunkNames: 'chunks/[name]-[hash]',
  // Node built-ins and packages with native parts stay external.
  external: ['playwright-core', '@resvg/resvg-js'],
  banner: { js: "import { createRequire as __skytallyRequire } from 'node:module'; const require = __skytallyRequire(import.meta.url);" },
  logLevel: 'warning',
});
