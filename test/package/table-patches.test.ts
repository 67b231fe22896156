/**
 * The built bundles carry cli-table3 with exactly equivalent faster parts (scripts/table-patches.mjs:
 * the width of plain ASCII text, lines without colour codes, the border characters and paddings
 * read without setOption, the debug message's truncation made only when recorded, no search for
 * missing cells in a full table). Here cli-table3 is bundled twice, as published and as patched,
 * and every string width and every table below must come out the same from both, character for
 * character (source: the package as published is the reference; the cases are from memory of
 * cli-table3's options and README: spans, wrapping, truncation, colours, alignment, custom
 * characters, debug messages).
 */
import { existsSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { join } from 'node:path';
import { build } from 'esbuild';
import { beforeAll, describe, expect, test } from 'vitest';
import { fasterTables, patchCliTable } from '../../scripts/table-patches.mjs';
import { tempDir } from '../support/temp.js';

interface TableLike {
  push(...rows: unknown[]): number;
  toString(): string;
  messages?: string[];
}
interface CliTable {
  Table: (new (options?: Record<string, unknown>) => TableLike) & { reset(): void };
  strlen(s: unknown): number;
  truncate(s: string, n: number, c?: string): string;
}

const dir = tempDir('skytally-table-patches-test-');
let published: CliTable;
let patched: CliTable;

async function bundle(name: string, plugins: Parameters<typeof build>[0]['plugins']): Promise<CliTable> {
  const r = await build({
    stdin: {
      contents:
        "module.exports = { Table: require('cli-table3'), strlen: require('cli-table3/src/utils').strlen, truncate: require('cli-table3/src/utils').truncate };",
      resolveDir: process.cwd(),
      sourcefile: `${name}.js`,
    },
    bundle: true,
    platform: 'node',
    format: 'cjs',
    write: false,
    logLevel: 'silent',
    plugins,
  });
  const file = join(dir, `${name}.cjs`);
  writeFileSync(file, r.outputFiles[0]!.text);
  return createRequire(import.meta.url)(file) as CliTable;
}

beforeAll(async () => {
  published = await bundle('published', []);
  patched = await bundle('patched', [fasterTables]);
});

const ESC = '\u001b';
/** Plain, numeric, wide, combining, control, coloured, emoji and multi-line texts. */
const TEXTS = [
  '',
  ' ',
  'x',
  'count',
  '0.3866 - 0.4171',
  'limit log10 L [erg/s]',
  '+/- (1 sigma)',
  '~!@#$%^&*()_+`-={}|[]\\:";\'<>?,./',
  'σ = 0.05 (1 + z)',
  'α = -1.35',
  '± 231',
  '© 2026',
  '®',
  '©\uFE0F',
  '1\uFE0F\u20E3',
  '#\uFE0F\u20E3',
  '#*0',
  'H\u03b1 emitters',
  'Hα',
  'e\u0301t\u00e9',
  '漢字の表',
  'ｆｕｌｌ',
  '😀 smile',
  '👍🏽',
  '🇬🇧 flag',
  '👨‍👩‍👧 family',
  'tab\there',
  'del\u007fete',
  'nbsp\u00a0here',
  'bell\u0007',
  'two\nlines',
  'three\nshort\nlines of text',
  '\n',
  `${ESC}[31mred${ESC}[39m`,
  `${ESC}[1mbold ${ESC}[32mgreen${ESC}[39m and plain${ESC}[22m`,
  `${ESC}[41mbackground${ESC}[49m`,
  `${ESC}[31mred\nstill red${ESC}[39m`,
  `${ESC}]8;;https://example.org\u0007link${ESC}]8;;\u0007`,
  'a very long cell that will need truncating or wrapping when the column is narrow',
  'supercalifragilisticexpialidocious',
  '…',
  '\u009b31m',
  '\ud83d',
  'a\u200bb',
];

describe('cli-table3 as patched in the bundles', () => {
  test('measures every text as the published package does', () => {
    const values: unknown[] = [...TEXTS, 0, 42, -1.5, 1e21, true, null, undefined];
    // every code point below U+0400 alone, and within printable text
    for (let c = 0; c < 0x400; c++) values.push(String.fromCharCode(c), `ab${String.fromCharCode(c)}cd`);
    for (const v of values) expect(patched.strlen(v), JSON.stringify(v)).toBe(published.strlen(v));
    for (const t of TEXTS)
      for (const n of [0, 1, 3, 10, 40]) expect(patched.truncate(t, n), `${t} ${n}`).toBe(published.truncate(t, n));
  });

  /** The table's text (or the error it throws) and its debug messages. */
  function drawn(pkg: CliTable, options: Record<string, unknown>, rows: unknown[]): [string, string[] | undefined] {
    const table = new pkg.Table(structuredClone(options));
    table.push(...structuredClone(rows));
    let text: string;
    try {
      text = table.toString();
    } catch (e) {
      text = `throws ${String(e)}`;
    }
    const messages = table.messages?.slice();
    pkg.Table.reset();
    return [text, messages];
  }

  /** Draws the same table with both packages and compares them (and their debug messages). */
  function same(options: Record<string, unknown>, rows: unknown[]): string {
    const a = drawn(published, options, rows);
    expect(drawn(patched, options, rows)).toEqual(a);
    return a[0];
  }

  test('draws plain tables as the published package does', () => {
    const plain = { style: { head: [], border: [] } };
    const text = same({ ...plain, head: ['slice z', 'count', '+/- (1 sigma)'] }, [
      ['0.3866 - 0.4171', '794.3', '231'],
      ['total', '2979', ''],
    ]);
    expect(text.split('\n')).toHaveLength(7);
    same({}, [['no head'], ['second']]);
    same({ head: ['coloured head', 'b'] }, [['x', 'y']]);
    same({ ...plain, head: [] }, []);
    same({ ...plain, head: ['only head'] }, []);
    // every text in every column, with and without colours
    for (const style of [plain, {}, { style: { head: ['green', 'bold'], border: ['grey'], compact: true } }])
      same(
        { ...style, head: ['a', 'b', 'c'] },
        TEXTS.map((t, i) => [t, TEXTS[(i * 7) % TEXTS.length]!, i]),
      );
  });

  test('draws spans, missing cells, wrapping, truncation and alignment as the published package does', () => {
    same({ head: ['a', 'b', 'c'] }, [['short row'], ['one', 'two', 'three', 'four'], []]);
    same({}, [
      [{ colSpan: 2, content: 'spans two' }, 'c'],
      [{ rowSpan: 2, content: 'spans two rows' }, 'b', 'c'],
      ['b2', { content: 'c2', hAlign: 'right' }],
      [{ colSpan: 3, rowSpan: 2, content: 'wide and tall', vAlign: 'center', hAlign: 'center' }],
      [],
      ['σ', '漢字', '😀'],
    ]);
    same(
      { colWidths: [6, 12, 5], wordWrap: true },
      TEXTS.slice(0, 30).map((t, i) => [t, TEXTS[29 - i]!, i]),
    );
    same(
      { colWidths: [8, 10], wordWrap: true, wrapOnWordBoundary: false },
      TEXTS.map((t) => [t, t]),
    );
    same(
      { colWidths: [5, null, 9], rowHeights: [1, 2] },
      TEXTS.map((t) => [t, t, t]),
    );
    same({ colAligns: ['left', 'center', 'right'], rowAligns: ['top', 'center', 'bottom'] }, [
      ['a', 'two\nlines', 'three\nlines\nhere'],
      ['b', 'x', 'y'],
    ]);
    same({ truncate: '~', colWidths: [4, 4] }, [
      ['truncated', 'σσσσσσ'],
      [{ content: 'cell', truncate: '>' }, '😀😀😀'],
    ]);
    same({}, [[{ content: 'link', href: 'https://example.org' }, { href: 'https://example.org/x' }]]);
    same({}, [{ 'key column': 'value' }, { other: ['v1', 'v2'] }]);
  });

  test('reads border characters and paddings as the published package does', () => {
    const rows = [
      ['a', 'b'],
      ['c', { content: 'd', chars: { 'top-mid': '+', midMid: '*', left: 'L' } }],
      [
        { content: 'e', style: { 'padding-left': 3, paddingRight: 0 } },
        { content: 'f', style: { paddingLeft: 0 } },
      ],
    ];
    same({}, rows);
    same(
      {
        chars: { 'top-left': '/', topRight: '\\', mid: '=', 'mid-mid': null, middle: undefined },
        style: { 'padding-left': 0 },
      },
      rows,
    );
    same(
      {
        chars: { topMid: 'T', 'top-mid': 't', bottom: '_', 'bottom-left': '' },
        style: { paddingLeft: 2, 'padding-right': 4 },
      },
      rows,
    );
    same({ style: { 'padding-left': 2, paddingRight: undefined } }, rows);
    // a padding of null reaches repeat() as null in both (an invalid array length)
    expect(same({ style: { 'padding-left': null } }, rows)).toMatch(/^throws RangeError/);
  });

  test('records the same debug messages', () => {
    for (const debug of [true, 1, 2, 3, '3'])
      same({ debug }, [
        ['a long first cell', { content: 'spans', colSpan: 2 }],
        [{ content: 'tall', rowSpan: 2 }, 'b'],
        ['c'],
        ['σσσσσσσσσσσσσσ', '😀😀😀😀😀😀😀😀'],
      ]);
  });

  test('refuses to build when cli-table3 no longer reads as expected', () => {
    const text = readFileSync('node_modules/cli-table3/src/utils.js', 'utf8');
    expect(patchCliTable('utils.js', text)).toContain('PRINTABLE_ASCII.test(str)');
    expect(() => patchCliTable('utils.js', text.replace('function strlen(str) {', 'function strlen(s) {'))).toThrow(
      /cli-table3 changed: utils\.js no longer reads as scripts\/table-patches\.mjs expects/,
    );
    const cell = readFileSync('node_modules/cli-table3/src/cell.js', 'utf8');
    expect(() => patchCliTable('cell.js', cell.replace("  'mid-mid',\n", ''))).toThrow(/cli-table3 changed/);
  });
});

describe('the built bundles', () => {
  beforeAll(() => {
    if (!existsSync('dist/cli/skytally.cjs')) throw new Error('dist/cli/skytally.cjs is missing: run npm run build');
  });
  test('the program and the library both carry the patched cli-table3', () => {
    const chunks = readdirSync('dist/chunks')
      .filter((f) => f.endsWith('.js'))
      .map((f) => join('dist/chunks', f));
    const files = ['dist/cli/skytally.cjs', ...chunks].filter((f) =>
      readFileSync(f, 'latin1').includes('// node_modules/cli-table3/src/utils.js'),
    );
    expect(files).toContain('dist/cli/skytally.cjs');
    expect(files.length).toBe(2);
    for (const f of files) {
      const text = readFileSync(f, 'latin1');
      expect(text).toContain('if (PRINTABLE_ASCII.test(str)) return str.length;');
      expect(text).toContain('debugLevel() >= INFO');
      expect(text).toContain('if (table.every(full)) return;');
    }
  });
});
