/**
 * The common expressions in z are read without building mathjs's parser (quickParse in
 * src/survey/quick-expression.ts). Reference: mathjs 15's own parser, which read every expression
 * before. For generated expressions (valid ones, and ones with names, numbers, blanks and
 * adjacencies outside the grammar), the quick tree must equal mathjs's node for node (type,
 * operator, function, name, value: tolerance 0), or be undefined so that mathjs reads the text
 * and writes the messages. Valid expressions in the documented grammar must all take the quick
 * path, as must every expression of every sample.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { parse as parseYaml } from 'yaml';
import { getParser } from '../../src/survey/mathjs.js';
import { quickParse } from '../../src/survey/quick-expression.js';
import { compileExpression } from '../../src/survey/expressions.js';

interface Plain {
  type: string;
  value?: unknown;
  name?: string;
  op?: string;
  fn?: string | Plain;
  implicit?: boolean;
  args?: Plain[];
  content?: Plain;
}

/** The fields of a node expressions.ts reads, from a mathjs node or a quick one. */
function plain(n: Record<string, unknown>): Plain {
  const out: Plain = { type: n.type as string };
  if (n.type === 'ConstantNode') out.value = n.value;
  if (n.type === 'SymbolNode') out.name = n.name as string;
  if (n.type === 'OperatorNode') {
    out.op = n.op as string;
    out.fn = n.fn as string;
    out.implicit = Boolean(n.implicit);
  }
  if (n.type === 'FunctionNode') out.fn = plain(n.fn as Record<string, unknown>);
  if (Array.isArray(n.args)) out.args = (n.args as Record<string, unknown>[]).map(plain);
  if (n.content) out.content = plain(n.content as Record<string, unknown>);
  return out;
}

function viaMathjs(text: string): Plain | 'error' {
  try {
    return plain(getParser().parse(text) as unknown as Record<string, unknown>);
  } catch {
    return 'error';
  }
}

const gap = fc.constantFrom('', '', ' ', '  ', '\t');
const number = fc.oneof(
  fc.constantFrom('0', '1', '2', '10', '0.5', '.25', '1.5e3', '2E-4', '3e+2', '6.02e23', '1e400'),
  fc.double({ min: 0, max: 1e6, noNaN: true }).map((x) => String(x)),
);
/** Expressions in the documented grammar, explicit `*` everywhere. */
const valid: fc.Arbitrary<string> = fc.letrec<{ e: string }>((tie) => ({
  e: fc.oneof(
    { depthSize: 'small', withCrossShrink: true },
    number,
    fc.constant('z'),
    fc.tuple(fc.constantFrom('-', '+'), gap, tie('e')).map(([o, g, a]) => `${o}${g}${a}`),
    fc
      .tuple(tie('e'), gap, fc.constantFrom('+', '-', '*', '/', '^'), gap, tie('e'))
      .map(([a, g1, o, g2, b]) => `${a}${g1}${o}${g2}${b}`),
    fc.tuple(gap, tie('e'), gap).map(([g1, a, g2]) => `(${g1}${a}${g2})`),
    fc.tuple(fc.constantFrom('log10', 'ln', 'exp', 'sqrt', 'abs'), gap, tie('e')).map(([f, g, a]) => `${f}${g}(${a})`),
    fc
      .tuple(fc.constantFrom('min', 'max'), fc.array(tie('e'), { minLength: 1, maxLength: 3 }))
      .map(([f, as]) => `${f}(${as.join(', ')})`),
  ),
})).e;
/** Pieces outside the grammar mixed in: other names, odd numbers, adjacency, other characters. */
const odd = fc.constantFrom(
  'pi',
  'e',
  'x',
  'Infinity',
  'NaN',
  'true',
  'mod',
  'to',
  '5.',
  '0x10',
  '2z',
  '1e',
  'z(2)',
  'log10',
  'sqrt()',
  '%',
  '!',
  "'",
  '[1]',
  '.5.5',
  '\n',
  ' in ',
  ':',
  'zé',
  '$a',
);
const mixed = fc
  .tuple(valid, fc.array(fc.tuple(fc.nat(), odd, gap), { minLength: 1, maxLength: 3 }))
  .map(([text, inserts]) => {
    let t = text;
    for (const [at, piece, g] of inserts) {
      const k = at % (t.length + 1);
      t = `${t.slice(0, k)}${g}${piece}${t.slice(k)}`;
    }
    return t;
  });
const adjacent = fc.tuple(valid, gap, valid).map(([a, g, b]) => `(${a})${g}${b}`);

describe('quick expression trees equal mathjs node for node', () => {
  test("every valid expression takes the quick path and gives mathjs's tree", () => {
    fc.assert(
      fc.property(valid, (text) => {
        const quick = quickParse(text);
        expect(quick).not.toBeUndefined();
        expect(plain(quick as unknown as Record<string, unknown>)).toEqual(viaMathjs(text));
      }),
      { numRuns: 2000 },
    );
  });

  test("anything else is either mathjs's tree or left to mathjs", () => {
    let left = 0;
    fc.assert(
      fc.property(fc.oneof(mixed, adjacent), (text) => {
        const quick = quickParse(text);
        if (quick === undefined) left++;
        else expect(plain(quick as unknown as Record<string, unknown>)).toEqual(viaMathjs(text));
      }),
      { numRuns: 2000 },
    );
    expect(left).toBeGreaterThan(500);
  });

  test('precedence and associativity as mathjs reads them (values by hand)', () => {
    const at = (text: string, z: number) => compileExpression(text, 'f.yaml', 'k').fn(z);
    expect(at('-2^2', 0)).toBe(-4);
    expect(at('2^3^2', 0)).toBe(512);
    expect(at('2^-1', 0)).toBe(0.5);
    expect(at('8/2/2', 0)).toBe(2);
    expect(at('1 - 2 - 3', 0)).toBe(-4);
    expect(at('-z^2 + 1', 3)).toBe(-8);
    expect(at('min(z, 2, -1)', 0.5)).toBe(-1);
  });

  test("errors are still mathjs's and the grammar's (the quick path leaves them)", () => {
    for (const [text, word] of [
      ['2 z', 'without a "*"'],
      ['pi * z', '"pi"'],
      ['sqrt()', 'with 0 arguments'],
      ['z(2)', '"z"'],
      ['(1 + z', 'cannot be read'],
      ['5.', undefined],
    ] as const) {
      expect(quickParse(text)).toBeUndefined();
      if (word) expect(() => compileExpression(text, 'f.yaml', 'k')).toThrow(word);
    }
  });

  test('every expression of every sample takes the quick path', () => {
    const dir = join(__dirname, '../../samples');
    let seen = 0;
    const visit = (v: unknown): void => {
      if (
        typeof v === 'string' &&
        /\bz\b/.test(v) &&
        /^[-+*/^().,\s\w]+$/.test(v) &&
        !/[a-y]{3,}/.test(v.replace(/log10|sqrt|exp|abs|min|max|ln/g, ''))
      ) {
        seen++;
        const quick = quickParse(v);
        expect(quick, v).not.toBeUndefined();
        expect(plain(quick as unknown as Record<string, unknown>)).toEqual(viaMathjs(v));
      } else if (Array.isArray(v)) v.forEach(visit);
      else if (v && typeof v === 'object') Object.values(v).forEach(visit);
    };
    for (const f of readdirSync(dir).filter((x) => x.endsWith('.yaml')))
      visit(parseYaml(readFileSync(join(dir, f), 'utf8')));
    expect(seen).toBeGreaterThanOrEqual(5);
  });
});
