// The explore page's script: src/explore/browser/main.ts and the engine it runs (the loader,
// predict, the forecast's Fisher matrix, the page's views) bundled by esbuild into one classic
// script for browsers. The loader's file reader is replaced by the page's (files embedded in the
// page), node:path by a small POSIX version, Buffer by the one function the loader uses, and the
// Node modules reached only by code the page never runs (worker threads) by stubs.
import { build } from 'esbuild';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const browser = join(root, 'src/explore/browser');

const pagePlugin = {
  name: 'explore-page',
  setup(b) {
    b.onResolve({ filter: /^node:path$|^path$/ }, () => ({ path: join(browser, 'shims/path.ts') }));
    b.onResolve({ filter: /^node:/ }, () => ({ path: join(browser, 'shims/node-stub.ts') }));
    b.onResolve({ filter: /\/read-input\.js$/ }, (args) =>
      args.importer.startsWith(join(root, 'src/survey')) ? { path: join(browser, 'read-input.ts') } : undefined,
    );
  },
};

/**
 * Bundles the page script; returns its text (and writes it to `outfile` when given, with a source
 * map beside it, as every file of dist/ has). Not minified, as the rest of dist/: the page's
 * stack traces name our functions.
 */
export async function bundleExplorePage(outfile) {
  const r = await build({
    entryPoints: [join(browser, 'main.ts')],
    bundle: true,
    write: false,
    format: 'iife',
    platform: 'browser',
    target: 'es2022',
    minify: false,
    sourcemap: outfile ? 'linked' : false,
    legalComments: 'eof',
    charset: 'utf8',
    inject: [join(browser, 'shims/buffer.ts')],
    // Module URLs name files of the package; in the page they are never fetched (the survey
    // schema's URL is only a name), so any file URL will do. import.meta.resolve (worker threads)
    // is never called there.
    define: { 'import.meta.url': JSON.stringify('file:///skytally/src/survey/module.js') },
    logOverride: { 'empty-import-meta': 'silent' },
    plugins: [pagePlugin],
    logLevel: 'warning',
    ...(outfile ? { outfile } : { outdir: 'unused' }),
  });
  const js = r.outputFiles.find((f) => f.path.endsWith('.js'));
  if (outfile) {
    const { mkdirSync, writeFileSync } = await import('node:fs');
    mkdirSync(dirname(resolve(outfile)), { recursive: true });
    for (const f of r.outputFiles) writeFileSync(f.path, f.contents);
  }
  return js.text;
}
