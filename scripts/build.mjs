// Build: `tsc` emits the type declarations into dist/, then esbuild bundles the library
// (dist/index.js), the command-line program (dist/cli/skytally.js) and the worker threads' entry
// (dist/worker.js) with shared chunks, one per lazily loaded module, so that start-up reads a few
// files instead of hundreds (mathjs's ESM entry alone costs over a second unbundled) and carries
// only the parts of mathjs we use. The code is not minified (stack traces and a reader of dist/
// see our names) and every file has a source map back to src/.
import { execFileSync } from 'node:child_process';
import { rmSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { build } from 'esbuild';
import { bundleExplorePage } from './explore-bundle.mjs';

rmSync('dist', { recursive: true, force: true });
execFileSync(
  process.execPath,
  ['node_modules/typescript/bin/tsc', '-p', 'tsconfig.build.json', '--emitDeclarationOnly'],
  {
    stdio: 'inherit',
  },
);
// mathjs (its parser for unusual expressions in z, its units for unusual unit strings) in a file of
// its own, loaded synchronously on first use through the package's private import #mathjs
// (src/survey/mathjs-lazy.ts takes the place of src/survey/mathjs.ts in the bundles below), so that
// the program does not read and compile it at every start.
const survey = resolve('src/survey');
const lazyMathjs = {
  name: 'lazy-mathjs',
  setup(b) {
    b.onResolve({ filter: /^\.\/mathjs\.js$/ }, (args) =>
      args.importer.startsWith(survey) ? { path: join(survey, 'mathjs-lazy.ts') } : undefined,
    );
  },
};
await build({
  entryPoints: ['src/survey/mathjs.ts'],
  outfile: 'dist/mathjs.cjs',
  bundle: true,
  format: 'cjs',
  platform: 'node',
  target: 'node20',
  minify: false,
  sourcemap: true,
  legalComments: 'eof',
  logLevel: 'warning',
});
await build({
  entryPoints: { index: 'src/index.ts', 'cli/skytally': 'src/cli/main.ts', worker: 'src/worker.ts' },
  plugins: [lazyMathjs],
  outdir: 'dist',
  bundle: true,
  splitting: true,
  format: 'esm',
  platform: 'node',
  target: 'node20',
  minify: false,
  sourcemap: true,
  // The licence comments of bundled packages are kept, at the end of each file.
  legalComments: 'eof',
  chunkNames: 'chunks/[name]-[hash]',
  // Node built-ins and packages with native parts stay external.
  external: ['playwright-core', '@resvg/resvg-js'],
  banner: {
    js: "import { createRequire as __skytallyRequire } from 'node:module'; const require = __skytallyRequire(import.meta.url);",
  },
  logLevel: 'warning',
});
// The explore page's script (src/explore/browser/main.ts with the engine), for browsers: inlined
// into every page `skytally explore` writes (scripts/explore-bundle.mjs).
await bundleExplorePage('dist/explore-page.js');
