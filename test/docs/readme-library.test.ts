/**
 * README's "As a library" examples run as written: every `ts` block of that section, in order, as
 * one module (each block may use what an earlier one defined, as a reader runs them one after the
 * other), its imports of 'skytally' read from src/index.ts and merged into one declaration. A
 * block that names something no block defines, or calls a function with arguments it refuses,
 * fails here. The values it prints are checked against the functions' own (common practice: an
 * example's output is what the library gives).
 */
import { describe, expect, test, vi } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { tempDir } from '../support/temp.js';
import { useExploreScript } from '../support/explore-script.js';
import { loadSurveyFile, predict } from '../../src/index.js';

/** The ts blocks of README's library section, in order. */
function libraryBlocks(): string[] {
  const readme = readFileSync('README.md', 'utf8');
  const section = readme.slice(
    readme.indexOf('## As a library'),
    readme.indexOf('\n## ', readme.indexOf('## As a library') + 1),
  );
  return [...section.matchAll(/```ts\n([\s\S]*?)```/g)].map((m) => m[1]!);
}

/** The blocks as one module: their imports merged per module (skytally's from src/index.ts), then their code. */
function asOneModule(blocks: string[]): string {
  const names = new Map<string, Set<string>>();
  const code: string[] = [];
  for (const block of blocks)
    for (const line of block.split('\n')) {
      const m = /^import \{([^}]*)\} from '([^']+)';$/.exec(line);
      if (!m) {
        code.push(line);
        continue;
      }
      const from = m[2] === 'skytally' ? pathToFileURL(resolve('src/index.ts')).href : m[2]!;
      const set = names.get(from) ?? new Set<string>();
      for (const n of m[1]!.split(',')) if (n.trim()) set.add(n.trim());
      names.set(from, set);
    }
  const imports = [...names].map(([from, set]) => `import { ${[...set].join(', ')} } from '${from}';`);
  return [...imports, ...code, 'export {};'].join('\n');
}

describe("README's library examples (the ts blocks of its section, run in order as one module)", () => {
  test('they run as written and print what the functions give', { timeout: 60_000 }, async () => {
    const blocks = libraryBlocks();
    expect(blocks.length).toBeGreaterThanOrEqual(9);
    // no block may import from anything but skytally and Node's own modules
    for (const b of blocks)
      for (const m of b.matchAll(/from '([^']+)'/g)) expect(m[1]).toMatch(/^(skytally|node:[a-z/]+)$/);
    await useExploreScript(); // (the sources' explore page needs its bundled script)
    const path = join(tempDir('skytally-readme-'), 'library-examples.ts');
    writeFileSync(path, asOneModule(blocks));
    const printed: unknown[][] = [];
    const log = vi.spyOn(console, 'log').mockImplementation((...args: unknown[]) => void printed.push(args));
    try {
      await import(pathToFileURL(path).href);
    } finally {
      log.mockRestore();
    }
    // the first print: the total and the slices' counts of the sample (as predict gives them)
    const p = predict(loadSurveyFile('samples/halpha-narrowband.yaml'));
    expect(printed[0]).toEqual([p.totals.count, p.slices!.map((s) => s.count)]);
    // every print holds values, none undefined or NaN
    expect(printed.length).toBe(8);
    for (const line of printed)
      for (const v of line) {
        expect(v).not.toBeUndefined();
        if (typeof v === 'number') expect(Number.isFinite(v)).toBe(true);
      }
    // the explore example: the total at 1.05 deg^2 is the sample's (2.1 deg^2) halved, counts
    // being proportional to the area (survey-file.md)
    expect(printed[2]![0] as number).toBeCloseTo(p.totals.count / 2, 6);
    // the loop over the area: the sample's counts halved and doubled (proportional to the area)
    expect(printed[6]).toEqual([1.05, expect.closeTo(p.totals.count / 2, 6) as unknown]);
    expect(printed[7]).toEqual([4.2, expect.closeTo(p.totals.count * 2, 6) as unknown]);
  });
});
