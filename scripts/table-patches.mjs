// cli-table3 (the text tables of predict, forecast, plan, compare, distances and clustering) does
// much work per cell that a table of plain text does not need, and in a cold process most of it is
// run by the interpreter or compiled by V8's optimising compiler for a few hundred cells (a cold
// `predict` of the narrow-band interlopers: its tables about 226 million instructions of a 1.74
// billion process). The bundles get these exactly equivalent parts in its place, each kept only
// while the package reads as below (the build fails otherwise):
// - utils.js `strlen`: a string of printable ASCII alone (no escape code, no line break, nothing
//   wide, combining or emoji) is as wide as it is long; anything else is measured as before, by
//   string-width.
// - utils.js `colorizeLines`: lines without an escape character carry no colour state, and come
//   back as they went in.
// - cell.js `mergeTableOptions`: the border characters and paddings read in the same order
//   (the cell's options, then the table's, each under its camel-case name first) and written in
//   the same order, without `setOption`'s splitting of each name and `firstDefined`'s array per
//   call (V8 compiled those two and their caller anew in every process: 10-20 ms).
// - cell.js `draw`: the truncated content written to the debug messages is made only when a debug
//   level records them (debug.js gains a reader of its level).
// - layout-manager.js `fillInTable`: a table whose every row holds one cell per column, none
//   spanning, has no missing cell to fill (its search compares every position with every cell
//   above it, quadratic in the rows).
// test/package/table-patches.test.ts draws tables (colours, spans, wrapping, truncation, wide and
// combining characters, emoji) with the package as published and as patched, and compares them.
import { readFile } from 'node:fs/promises';

const CHAR_NAMES = [
  'top',
  'top-mid',
  'top-left',
  'top-right',
  'bottom',
  'bottom-mid',
  'bottom-left',
  'bottom-right',
  'left',
  'left-mid',
  'mid',
  'mid-mid',
  'right',
  'right-mid',
  'middle',
];

/** setOption's name for a hyphenated option: 'top-mid' -> 'topMid' (as cell.js makes it). */
function camel(name) {
  const parts = name.split('-');
  if (parts.length === 1) return name;
  parts[1] = parts[1].charAt(0).toUpperCase() + parts[1].substr(1);
  return parts.join('');
}

/** setOption(a, b, name, target) written out: the first value neither undefined nor null, else undefined. */
function firstDefinedOf(target, a, b, name) {
  const key = camel(name);
  const q = (k) => (/^[a-z]+$/i.test(k) ? `.${k}` : `['${k}']`);
  const reads =
    key === name ? [`${a}${q(name)}`, `${b}${q(name)}`] : [a, a, b, b].map((o, i) => o + q(i % 2 ? name : key));
  return `${target}.${key} = ${reads.join(' ?? ')} ?? undefined;`;
}

const MERGE_CHARS_FROM = `    let chars = (this.chars = {});
    CHAR_NAMES.forEach(function (name) {
      setOption(optionsChars, tableChars, name, chars);
    });
`;
const MERGE_CHARS_TO = `    let chars = (this.chars = {});
${CHAR_NAMES.map((n) => `    ${firstDefinedOf('chars', 'optionsChars', 'tableChars', n)}`).join('\n')}
`;
const PADDING_FROM = `    setOption(style, tableStyle, 'padding-left', this);
    setOption(style, tableStyle, 'padding-right', this);
`;
const PADDING_TO = `    ${firstDefinedOf('this', 'style', 'tableStyle', 'padding-left')}
    ${firstDefinedOf('this', 'style', 'tableStyle', 'padding-right')}
`;

/** Each patched file: [text as published, its replacement], every one found exactly once. */
const PATCHES = {
  'utils.js': [
    [
      `function strlen(str) {
  let code = codeRegex();
  let stripped = ('' + str).replace(code, '');`,
      `const PRINTABLE_ASCII = /^[\\x20-\\x7e]*$/;
function strlen(str) {
  str = '' + str;
  if (PRINTABLE_ASCII.test(str)) return str.length;
  let code = codeRegex();
  let stripped = str.replace(code, '');`,
    ],
    [
      `function colorizeLines(input) {
  let state = {};`,
      `function colorizeLines(input) {
  if (!input.some((line) => line.includes('\\u001b'))) return input.slice();
  let state = {};`,
    ],
  ],
  'cell.js': [
    [
      `const { info, debug } = require('./debug');`,
      `const { info, debug, INFO, level: debugLevel } = require('./debug');`,
    ],
    [MERGE_CHARS_FROM, MERGE_CHARS_TO],
    [PADDING_FROM, PADDING_TO],
    [
      `    let content = utils.truncate(this.content, 10, this.truncate);
    if (!lineNum) {
      info(`,
      `    if (!lineNum && debugLevel() >= INFO) {
      let content = utils.truncate(this.content, 10, this.truncate);
      info(`,
    ],
    [
      `let CHAR_NAMES = [
${CHAR_NAMES.map((n) => `  '${n}',`).join('\n')}
];`,
      `let CHAR_NAMES = [
${CHAR_NAMES.map((n) => `  '${n}',`).join('\n')}
];`,
    ],
  ],
  'debug.js': [
    [
      `debug.debugMessages = () => messages;`,
      `debug.debugMessages = () => messages;
debug.level = () => level;`,
    ],
  ],
  'layout-manager.js': [
    [
      `    debug(\`Max rows: \${h_max}; Max cols: \${w_max}\`);
`,
      `    debug(\`Max rows: \${h_max}; Max cols: \${w_max}\`);
    const full = (row) =>
      row.length === w_max && row.every((cell, x) => cell.x === x && (cell.rowSpan || 1) === 1 && (cell.colSpan || 1) === 1);
    if (table.every(full)) return;
`,
    ],
  ],
};

/** The patched text of one of cli-table3's source files (`name` its file name), or an error naming what changed. */
export function patchCliTable(name, text, path = name) {
  let out = text;
  for (const [from, to] of PATCHES[name] ?? []) {
    const at = out.indexOf(from);
    if (at < 0 || out.indexOf(from, at + 1) >= 0)
      throw new Error(`cli-table3 changed: ${path} no longer reads as scripts/table-patches.mjs expects`);
    out = out.slice(0, at) + to + out.slice(at + from.length);
  }
  return out;
}

/** The esbuild plugin that bundles cli-table3 with the parts above. */
export const fasterTables = {
  name: 'faster-tables',
  setup(b) {
    b.onLoad({ filter: /[\\/]cli-table3[\\/]src[\\/](utils|cell|debug|layout-manager)\.js$/ }, async (args) => {
      const name = args.path.split(/[\\/]/).pop();
      return { contents: patchCliTable(name, await readFile(args.path, 'utf8'), args.path), loader: 'js' };
    });
  },
};
