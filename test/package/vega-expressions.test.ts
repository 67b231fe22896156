/**
 * The built bundles' vega keeps each expression's parse by its text (scripts/build.mjs,
 * keptExpressionParses: vega-functions' parser, the syntax tree and its JavaScript source made
 * once per text, the scope's parameters worked out at every call). The figures must be those of
 * vega as published, which the TypeScript sources run: a report whose eight figures share most
 * of their expressions (between facet panels, axes and figures) is compared byte for byte.
 */
import { execFileSync } from 'node:child_process';
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, test } from 'vitest';
import { sampleReport } from '../support/sample-reports.js';
import { tempDir } from '../support/temp.js';

const dir = tempDir('skytally-vega-expressions-test-');

beforeAll(() => {
  if (!existsSync('dist/vega.cjs') || !existsSync('dist/cli/skytally.cjs'))
    execFileSync('npm', ['run', 'build'], { stdio: 'ignore' });
}, 300_000);

/** The built files that hold vega-functions: the program's dist/vega.cjs and the library's chunk. */
function bundlesWithVegaFunctions(): string[] {
  const chunks = readdirSync('dist/chunks')
    .filter((f) => f.endsWith('.js'))
    .map((f) => join('dist/chunks', f));
  return ['dist/vega.cjs', ...chunks].filter((f) =>
    readFileSync(f, 'latin1').includes('// node_modules/vega-functions/build/vega-functions.js'),
  );
}

describe("vega's expression parses, kept by text in the built bundles", () => {
  test('the program and the library both keep them', () => {
    const files = bundlesWithVegaFunctions();
    expect(files).toContain('dist/vega.cjs');
    expect(files.length).toBe(2);
    for (const f of files) expect(readFileSync(f, 'latin1')).toContain('keptExpressions.get(expr');
  });

  test('a report with several populations draws what vega as published draws, byte for byte', async () => {
    const sample = 'narrowband-interlopers.yaml';
    const out = join(dir, 'report.html');
    execFileSync(process.execPath, ['bin/skytally.js', 'report', `samples/${sample}`, '--out', out], {
      stdio: 'ignore',
    });
    const built = readFileSync(out, 'utf8');
    // the same command run from the TypeScript sources, with vega from node_modules
    const sources = readFileSync((await sampleReport(sample)).html, 'utf8');
    expect(built.match(/<svg/g)?.length).toBe(8);
    expect(built).toBe(sources);
  }, 120_000);
});
