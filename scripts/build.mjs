// Build: `tsc` emits the type declarations into dist/, then esbuild bundles the library
// (dist/index.js) and the command-line program (dist/cli/skytally.js) with shared chunks, one per
// lazily loaded module, so that start-up reads a few files instead of hundreds (mathjs's ESM
// entry alone costs over a second unbundled) and carries only the parts of mathjs we use.
import { execFileSync } from 'node:child_process';
import { rmSync } from 'node:fs';
import { build } from 'esbuild';

rmSync('dist', { recursive: true, force: true });
execFileSync(process.execPath, ['node_modules/typescript/bin/tsc', '-p', 'tsconfig.build.json', '--emitDeclarationOnly'], { stdio: 'inherit' });
await build({
  entryPoints: { index: 'src/index.ts', 'cli/skytally': 'src/cli/main.ts' },
  outdir: 'dist',
  bundle: true,
  splitting: true,
  format: 'esm',
  platform: 'node',
  target: 'node20',
  minify: process.env.SKYTALLY_NO_MINIFY ? false : true,
  legalComments: 'none',
  chunkNames: 'chunks/[name]-[hash]',
  // Node built-ins and packages with native parts stay external.
  external: ['playwright-core', '@resvg/resvg-js'],
  banner: { js: "import { createRequire as __skytallyRequire } from 'node:module'; const require = __skytallyRequire(import.meta.url);" },
  logLevel: 'warning',
});
