// Build: `tsc` emits the type declarations into dist/, then esbuild bundles the library
// (dist/index.js), the command-line program (dist/cli/skytally.js) and the worker threads' entry
// (dist/worker.js) with shared chunks, one per lazily loaded module, so that start-up reads a few
// files instead of hundreds (mathjs's ESM entry alone costs over a second unbundled) and carries
// only the parts of mathjs we use. The code is not minified (stack traces and a reader of dist/
// see our names) and every file has a source map back to src/.
import { execFileSync } from 'node:child_process';
import { readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { build } from 'esbuild';
import { bundleExplorePage } from './explore-bundle.mjs';
import { fasterTables } from './table-patches.mjs';

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
// Options of every CommonJS bundle (not minified, with source maps).
const cjs = {
  bundle: true,
  format: 'cjs',
  platform: 'node',
  target: 'node20',
  minify: false,
  sourcemap: true,
  legalComments: 'eof',
  logLevel: 'warning',
};
await build({
  entryPoints: ['src/survey/mathjs.ts'],
  outfile: 'dist/mathjs.cjs',
  ...cjs,
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
  ...cjs,
});
const src = resolve('src');
/** The generators' stand-ins, reading dist/random.cjs with `read` (an expression) on first use. */
const lazyRandomWith = (read) => ({
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
        `const load = () => (generator ??= (${read}).${args.path});`,
        'export default { factory: (...a) => load().factory(...a) };',
      ].join('\n'),
      loader: 'js',
      resolveDir: src,
    }));
  },
});
const lazyRandom = lazyRandomWith("createRequire(import.meta.url)('#random')");
// vega parses every expression of a figure's specification (vega-functions' parser: the text to a
// syntax tree, then the tree to JavaScript source) each time it meets it, and a report meets the
// same few hundred texts thousands of times (each facet panel's axes and marks, each figure's
// title and fonts: 2,435 parses of 220 texts for the narrow-band interlopers' eight figures). The
// tree and its source depend on the text alone (the code generator's functions are fixed once
// vega-functions is loaded), so they are kept by text; what depends on the scope (the data,
// scales and signals the expression reads, the visitors' and the globals' parameters) is worked
// out at every call as before. The same JavaScript source and parameters, so the same figures.
const EXPRESSION_PARSE = `  let ast;
  try {
    expr = isString(expr) ? expr : stringValue(expr) + '';
    ast = parseExpression(expr);
  } catch (err) {
    error('Expression parse error: ' + expr);
  }

  // analyze ast function calls for dependencies
  ast.visit(node => {
    if (node.type !== CallExpression) return;
    const name = node.callee.name,
      visit = codegenParams.visitors[name];
    if (visit) visit(name, node.arguments, scope, params);
  });

  // perform code generation
  const gen = codeGenerator(ast);
`;
const EXPRESSION_KEPT = `  expr = isString(expr) ? expr : stringValue(expr) + '';
  let kept = keptExpressions.get(expr);
  let ast = kept?.ast;
  if (!kept) {
    try {
      ast = parseExpression(expr);
    } catch (err) {
      error('Expression parse error: ' + expr);
    }
  }

  // analyze ast function calls for dependencies (the visitors read the tree, never change it)
  ast.visit(node => {
    if (node.type !== CallExpression) return;
    const name = node.callee.name,
      visit = codegenParams.visitors[name];
    if (visit) visit(name, node.arguments, scope, params);
  });

  // perform code generation (once per text; each call gets its own lists)
  if (!kept) {
    if (keptExpressions.size >= 4096) keptExpressions.clear();
    keptExpressions.set(expr, (kept = { ast, gen: codeGenerator(ast) }));
  }
  const gen = { code: kept.gen.code, globals: kept.gen.globals.slice(), fields: kept.gen.fields.slice() };
`;
const keptExpressionParses = {
  name: 'kept-expression-parses',
  setup(b) {
    b.onLoad({ filter: /[\\/]vega-functions[\\/]build[\\/]vega-functions\.js$/ }, async (args) => {
      const { readFile } = await import('node:fs/promises');
      const text = await readFile(args.path, 'utf8');
      const head =
        'function parser (expr, scope) {\n  const params = {};\n\n  // parse the expression to an abstract syntax tree (ast)\n';
      const from = head + EXPRESSION_PARSE;
      if (!text.includes(from))
        throw new Error(`vega-functions changed: ${args.path} no longer parses expressions as expected`);
      return {
        contents: text.replace(from, `const keptExpressions = new Map();\n${head}${EXPRESSION_KEPT}`),
        loader: 'js',
      };
    });
  },
};
await build({
  entryPoints: { index: 'src/index.ts', 'cli/skytally': 'src/cli/main.ts', worker: 'src/worker.ts' },
  plugins: [lazyMathjs, lazyRandom, keptExpressionParses, fasterTables],
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
// The command-line program again, as one CommonJS file (dist/cli/skytally.cjs, what
// bin/skytally.js runs), so that it can be compiled with V8's code cache (src/cli/code-cache.ts;
// ES modules cannot be in Node 20): mathjs and the random-number generators stay in their own
// files as above (the generators read with their code cache too), and vega with vega-lite goes
// into dist/vega.cjs, read (with its own code cache) only when a figure is drawn. The loader itself is bundled alone for bin/skytally.js.
const codeCache = resolve('src/cli/code-cache.ts');
const lazyVega = {
  name: 'lazy-vega',
  setup(b) {
    b.onResolve({ filter: /^vega(-lite)?$/ }, (args) =>
      args.importer.startsWith(src) ? { path: args.path, namespace: 'lazy-vega' } : undefined,
    );
    b.onLoad({ filter: /.*/, namespace: 'lazy-vega' }, (args) => ({
      contents: [
        `const { loadCached } = require(${JSON.stringify(codeCache)});`,
        "const { join } = require('node:path');",
        `module.exports = loadCached(join(__dirname, '..', 'vega.cjs')).exports.${args.path === 'vega' ? 'vega' : 'vegaLite'};`,
      ].join('\n'),
      loader: 'js',
      resolveDir: src,
    }));
  },
};
// vega-canvas reads the optional package `canvas` with a top-level await, which CommonJS cannot
// hold: the same reading, synchronous (without `canvas` installed both give no canvas).
const syncCanvas = {
  name: 'sync-canvas',
  setup(b) {
    b.onLoad({ filter: /vega-canvas\.node\.js$/ }, async (args) => {
      const { readFile } = await import('node:fs/promises');
      const text = await readFile(args.path, 'utf8');
      const from = "NodeCanvas = await import('canvas');";
      if (!text.includes(from)) throw new Error(`vega-canvas changed: ${args.path} no longer reads canvas as expected`);
      return { contents: text.replace(from, "NodeCanvas = require('canvas');"), loader: 'js' };
    });
  },
};
// The rasteriser's import() (src/render/write-figures.ts), made through the loader's own import()
// (see src/cli/code-cache.ts), or a plain import() when the bundle is loaded otherwise.
const loaderImport = {
  name: 'loader-import',
  setup(b) {
    b.onLoad({ filter: /[\\/]src[\\/]render[\\/]write-figures\.ts$/ }, async (args) => {
      const { readFile } = await import('node:fs/promises');
      const text = await readFile(args.path, 'utf8');
      const from = 'import(RASTERISER)';
      if (!text.includes(from)) throw new Error(`${args.path} no longer imports the rasteriser as expected`);
      const to = "(typeof __skytallyImport === 'function' ? __skytallyImport : (s) => import(s))(RASTERISER)";
      return { contents: text.replace(from, to), loader: 'ts' };
    });
  },
};
// Only the parts of vega the figures use (src/render/figures.ts: View, parse, loader, None; and
// vega-lite's compile), with the transforms vega-lite's output can name for them: those of
// vega-transforms, vega-view-transforms and vega-encode, registered as vega's own index registers
// them. The geographic, force, hierarchy, label, regression, Voronoi, word-cloud and crossfilter
// transforms (for maps, networks, trees and interaction: none of them drawn here) are left out,
// and with them their d3 packages: a smaller file to read and to run at every report.
const VEGA_ENTRY = [
  "import { extend } from 'vega-util';",
  "import { transforms } from 'vega-dataflow';",
  "import * as tx from 'vega-transforms';",
  "import * as vtx from 'vega-view-transforms';",
  "import * as encode from 'vega-encode';",
  'extend(transforms, tx, vtx, encode);',
  "import { View } from 'vega-view';",
  "import { parse } from 'vega-parser';",
  "import { loader } from 'vega-loader';",
  "import { None } from 'vega-util';",
  "import { compile } from 'vega-lite';",
  'export const vega = { View, parse, loader, None };',
  'export const vegaLite = { compile };',
].join('\n');
// vega-lite reads four helpers of vega-util (hasOwnProperty, isObject, isString, stringValue)
// through the package `vega`, whose index registers every transform: it reads them from vega-util.
const vegaLiteRoot = resolve('node_modules/vega-lite');
const vegaLiteUtil = {
  name: 'vega-lite-util',
  setup(b) {
    b.onResolve({ filter: /^vega$/ }, async (args) =>
      args.importer.startsWith(vegaLiteRoot)
        ? b.resolve('vega-util', { kind: args.kind, resolveDir: args.resolveDir })
        : undefined,
    );
  },
};
await build({
  ...cjs,
  stdin: {
    contents: VEGA_ENTRY,
    resolveDir: '.',
    sourcefile: 'vega-libraries.js',
  },
  outfile: 'dist/vega.cjs',
  plugins: [syncCanvas, vegaLiteUtil, keptExpressionParses],
  external: ['canvas'],
});
// commander reads node:child_process when loaded, for executable subcommands (a program per
// command), which skytally has none of: in the program's bundle commander gets a child_process whose
// spawn says so, and the start does not load Node's child_process (with net and dgram).
const commanderRoot = resolve('node_modules/commander');
const noChildProcess = {
  name: 'no-child-process',
  setup(b) {
    b.onResolve({ filter: /^node:child_process$/ }, (args) =>
      args.importer.startsWith(commanderRoot) ? { path: 'child_process', namespace: 'no-child-process' } : undefined,
    );
    b.onLoad({ filter: /.*/, namespace: 'no-child-process' }, () => ({
      contents:
        "exports.spawn = () => { throw new Error('skytally has no executable subcommands: commander cannot spawn one'); };",
      loader: 'js',
    }));
  },
};
await build({ ...cjs, entryPoints: [codeCache], outfile: 'dist/cli/code-cache.cjs' });
await build({
  ...cjs,
  entryPoints: ['src/cli/main.ts'],
  outfile: 'dist/cli/skytally.cjs',
  plugins: [
    lazyMathjs,
    lazyRandomWith(
      `require(${JSON.stringify(codeCache)}).loadCached(require('node:path').join(__dirname, '..', 'random.cjs')).exports`,
    ),
    lazyVega,
    loaderImport,
    noChildProcess,
    fasterTables,
  ],
  external: ['playwright-core', '@resvg/resvg-js'],
  // import.meta as CommonJS has it: this file's URL, and resolution from it (#worker, #explore-page).
  define: { 'import.meta.url': '__skytallyUrl', 'import.meta.resolve': '__skytallyResolve' },
  banner: {
    js: "const __skytallyUrl = require('node:url').pathToFileURL(__filename).href; const __skytallyResolve = (s) => require('node:url').pathToFileURL(require.resolve(s)).href;",
  },
});
// The bundles src/cli/code-cache.ts compiles, in ASCII: it reads an ASCII file as latin1 (a copy)
// where any other byte makes it decode UTF-8 (a few ms more of every start). esbuild escapes
// strings and templates but leaves the characters of regular expressions and comments as written;
// \uXXXX (per UTF-16 unit) means the same there. Source maps keep their columns but on such lines.
for (const file of ['dist/cli/skytally.cjs', 'dist/vega.cjs', 'dist/random.cjs']) {
  const text = readFileSync(file, 'utf8');
  const ascii = text.replace(/[^\t\n\r -~]/g, (c) => `\\u${c.charCodeAt(0).toString(16).padStart(4, '0')}`);
  if (ascii !== text) writeFileSync(file, ascii);
}
// The code caches, recorded by running the program over some samples (scripts/code-cache.mjs).
execFileSync(process.execPath, ['scripts/code-cache.mjs'], { stdio: 'inherit' });
// The explore page's script (src/explore/browser/main.ts with the engine), for browsers: inlined
// into every page `skytally explore` writes (scripts/explore-bundle.mjs).
await bundleExplorePage('dist/explore-page.js');
