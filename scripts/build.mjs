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
// The same for the random-number generators (@stdlib, some 280 kB with what they import, run when
// loaded): only model draws and mock surveys use them, so they are bundled alone into
// dist/random.cjs (the private import #random) and each import of one from src/ becomes an object
// whose `factory` (the one function we call) requires that file on first use.
const RANDOM = {
  '@stdlib/random-base-mt19937': 'mt19937',
  '@stdlib/random-base-normal': 'normal',
  '@stdlib/random-base-poisson': 'poisson',
};
await build({
  stdin: {
    contents: Object.entries(RANDOM)
      .map(([pkg, name]) => `export { default as ${name} } from '${pkg}';`)
      .join('\n'),
    resolveDir: '.',
    sourcefile: 'random-generators.js',
  },
  outfile: 'dist/random.cjs',
  bundle: true,
  format: 'cjs',
  platform: 'node',
  target: 'node20',
  minify: false,
  sourcemap: true,
  legalComments: 'eof',
  logLevel: 'warning',
});
const src = resolve('src');
const lazyRandom = {
  name: 'lazy-random',
  setup(b) {
    const filter = new RegExp(`^(${Object.keys(RANDOM).join('|')})$`);
    b.onResolve({ filter }, (args) =>
      args.importer.startsWith(src) ? { path: RANDOM[args.path], namespace: 'lazy-random' } : undefined,
    );
    b.onLoad({ filter: /.*/, namespace: 'lazy-random' }, (args) => ({
      contents: [
        "import { createRequire } from 'node:module';",
        'let generator;',
        `const load = () => (generator ??= createRequire(import.meta.url)('#random').${args.path});`,
        'export default { factory: (...a) => load().factory(...a) };',
      ].join('\n'),
      loader: 'js',
    }));
  },
};
await build({
  entryPoints: { index: 'src/index.ts', 'cli/skytally': 'src/cli/main.ts', worker: 'src/worker.ts' },
  plugins: [lazyMathjs, lazyRandom],
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
