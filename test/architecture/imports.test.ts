/**
 * The import graph of src/ follows the data flow DEVELOPERS.md draws ("Architecture"):
 *
 *   survey/ (the loader) ──> model/ <── physics and studies ──> render/ ──> library/ ──> cli/
 *
 * Every import of every module (static, `export ... from` and dynamic `import()`) is read with
 * TypeScript's own scanner (ts.preProcessFile) and checked against the rules below. A small scan
 * rather than dependency-cruiser: the rules are six lines, the project already has the parser,
 * and it runs in well under a second with no new dependency.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';
import ts from 'typescript';
import { describe, expect, test } from 'vitest';

const ROOT = resolve(__dirname, '../..');
const SRC = join(ROOT, 'src');

function sourceFiles(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((e) =>
    e.isDirectory() ? sourceFiles(join(dir, e.name)) : e.name.endsWith('.ts') ? [join(dir, e.name)] : [],
  );
}

/** src-relative path of each module -> src-relative paths of the modules it imports. */
function importGraph(): Map<string, string[]> {
  const graph = new Map<string, string[]>();
  for (const file of sourceFiles(SRC)) {
    const info = ts.preProcessFile(readFileSync(file, 'utf8'), true, true);
    const targets = info.importedFiles
      .map((f) => f.fileName)
      .filter((spec) => spec.startsWith('.') && !spec.endsWith('.json'))
      .map((spec) => relative(SRC, resolve(dirname(file), spec.replace(/\.js$/, '.ts'))));
    graph.set(relative(SRC, file), targets);
  }
  return graph;
}

/** The folder of a module ('survey', 'model', ...), or its own name for a file at the top of src/. */
const layer = (path: string): string => (path.includes('/') ? path.split('/')[0]! : path.replace(/\.ts$/, ''));

/** Modules of the computation: they may import one another, the model and the shared errors and warnings. */
const PHYSICS = ['cosmology', 'numerics', 'population', 'selection', 'counts', 'uncertainty', 'parallel'];
const STUDIES = ['forecast', 'planning'];
const SHARED = ['errors', 'warnings'];

/**
 * What the loader may reach, directly or through what it imports: itself, the model, the shared
 * errors and warnings, and the two constructors of model values that the physics owns (the
 * cosmology factory, which checks every cosmological parameter once, and the maths of
 * transmission curves, which gives a tabulated filter its centre, width and range), and the
 * selection effects' statement that `check` shows (selection/describe.ts with effects.ts), and the
 * linear growth factor (uncertainty/growth.ts, which imports only the numerics), which a bias given
 * as {over_growth: B}, b(z) = B / D(z), is made of.
 */
const LOADER_REACH = ['survey', 'model', ...SHARED];
/** The one module that writes numbers for people: it imports nothing, so every layer may use it (messages, summaries). */
const FORMAT = 'render/format.ts';
const LOADER_REACH_FILES = [
  'cosmology/parameters.ts',
  'cosmology/presets.ts',
  'cosmology/constants.ts',
  'selection/filter.ts',
  'selection/effects.ts',
  'selection/describe.ts',
  'uncertainty/growth.ts',
  FORMAT,
];

const graph = importGraph();
const edges = [...graph].flatMap(([from, tos]) => tos.map((to) => ({ from, to })));

function arrows(fromLayers: string[], toLayers: string[]): string[] {
  return edges
    .filter((e) => fromLayers.includes(layer(e.from)) && toLayers.includes(layer(e.to)))
    .map((e) => `${e.from} -> ${e.to}`);
}

describe('the import graph', () => {
  test('every relative import names a module of src/', () => {
    const missing = edges.filter((e) => !graph.has(e.to)).map((e) => `${e.from} -> ${e.to}`);
    expect(missing).toEqual([]);
  });

  test('the physics, the studies and the presentation never import the loader, the library or the command line', () => {
    expect(
      arrows([...PHYSICS, ...STUDIES, 'render', 'model', ...SHARED, 'worker'], ['survey', 'library', 'cli']),
    ).toEqual([]);
  });

  test('the model imports nothing but the model and the shared errors and warnings', () => {
    const out = edges.filter((e) => layer(e.from) === 'model' && !['model', ...SHARED].includes(layer(e.to)));
    expect(out.map((e) => `${e.from} -> ${e.to}`)).toEqual([]);
  });

  test('the loader reaches only the model, the cosmology factory, the transmission maths and the growth factor (never the counts, studies or presentation)', () => {
    const seen = new Set<string>();
    const stack = [...graph.keys()].filter((m) => layer(m) === 'survey');
    while (stack.length > 0) {
      const m = stack.pop()!;
      if (seen.has(m)) continue;
      seen.add(m);
      stack.push(...(graph.get(m) ?? []));
    }
    const outside = [...seen].filter(
      (m) => !LOADER_REACH.includes(layer(m)) && !LOADER_REACH_FILES.includes(m) && layer(m) !== 'numerics',
    );
    expect(outside.sort()).toEqual([]);
  });

  test('the physics does not import the studies, and presentation is not imported by the computation', () => {
    expect(arrows(PHYSICS, STUDIES)).toEqual([]);
    expect(arrows([...PHYSICS, ...STUDIES, 'model'], ['render']).filter((a) => !a.endsWith(` -> ${FORMAT}`))).toEqual(
      [],
    );
    expect(graph.get(FORMAT)).toEqual([]);
  });

  test('the library surface (src/index.ts) and the library layer do not import the command line', () => {
    expect(arrows(['index', 'library'], ['cli'])).toEqual([]);
  });

  test('the rules can fail: a made-up arrow from the physics into the loader is caught', () => {
    edges.push({ from: 'counts/engine.ts', to: 'survey/load.ts' });
    try {
      expect(arrows(PHYSICS, ['survey'])).toEqual(['counts/engine.ts -> survey/load.ts']);
    } finally {
      edges.pop();
    }
  });
});
