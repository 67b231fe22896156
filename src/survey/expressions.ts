/**
 * Safe expressions in redshift z (docs/survey-file.md, "Parameters that vary with redshift"): numbers, the symbol z, + - * / ^ (and unary
 * minus and plus), parentheses, and the functions log10, ln (natural log), exp, sqrt, abs, min, max.
 *
 * The text is parsed into a mathjs node tree (the common forms by quick-expression.ts, the rest by mathjs); the whole tree is checked against that list and
 * compiled into a plain JavaScript closure before anything is evaluated. mathjs never evaluates
 * the expression: the closure does the arithmetic with `Math`.
 *
 * Implicit multiplication ("2z", "2 z", "(1+z)(2+z)") is rejected: it is easy to misread
 * ("10^-0.4z" parses as (10^-0.4)*z), so a `*` must be written.
 */
import { inputError } from '../errors.js';
import { getParser } from './mathjs.js';
import { quickParse } from './quick-expression.js';
import * as I from './interval.js';

export type Closure = (z: number) => number;

export interface CompiledExpression {
  /** The expression text as given. */
  text: string;
  /** Evaluate at redshift z (plain JavaScript arithmetic; may return NaN, checked by the caller). */
  fn: Closure;
  /** True when the expression does not contain z. */
  constant: boolean;
  /** Bounds of what `fn` returns for every z from lo to hi (interval arithmetic, src/survey/interval.ts). */
  bounds: I.Bounds;
  /**
   * Bounds of the expression's derivative in z for every z from lo to hi (the same interval
   * arithmetic over the rules of differentiation; not widened for rounding: it guides where the
   * redshift quadrature cuts, zparam.ts `featureCuts`, and proves nothing). [NaN, NaN] where it may
   * be undefined or unbounded (sqrt or a power at 0).
   */
  slope: I.Bounds;
  /**
   * Functions of z whose sign changes where the expression has a kink: the argument of each abs,
   * and the difference of each pair of arguments of each min and max, that depend on z.
   */
  kinks: Closure[];
}

/** Longest expression accepted, in characters. */
export const MAX_EXPRESSION_LENGTH = 1000;

const UNARY: Record<string, (a: number) => number> = {
  log10: Math.log10,
  ln: Math.log,
  exp: Math.exp,
  sqrt: Math.sqrt,
  abs: Math.abs,
};
const UNARY_BOUNDS: Record<string, (a: I.Interval) => I.Interval> = {
  log10: (a) => I.logarithm(a, Math.log10),
  ln: (a) => I.logarithm(a, Math.log),
  exp: I.exp,
  sqrt: I.sqrt,
  abs: I.abs,
};
/** Derivative of each function, from the argument's value bounds v and derivative bounds d (chain rule). */
const UNARY_SLOPES: Record<string, (v: I.Interval, d: I.Interval) => I.Interval> = {
  log10: (v, d) => I.divide(d, I.multiply(v, [Math.LN10, Math.LN10])),
  ln: (v, d) => I.divide(d, v),
  exp: (v, d) => I.multiply(I.exp(v), d),
  sqrt: (v, d) => I.divide(d, I.multiply([2, 2], I.sqrt(v))),
  abs: (v, d) => (v[0] >= 0 ? d : v[1] <= 0 ? I.negate(d) : I.union([I.negate(d), d])),
};
const VARIADIC: Record<string, (...a: number[]) => number> = { min: Math.min, max: Math.max };
const VARIADIC_BOUNDS: Record<string, (a: readonly I.Interval[]) => I.Interval> = {
  min: I.minimum,
  max: I.maximum,
};
const ALLOWED_FUNCTIONS = [...Object.keys(UNARY), ...Object.keys(VARIADIC)].join(', ');

/** The parts of a mathjs node we read (kept structural to stay independent of mathjs classes). */
interface MathNode {
  type: string;
  value?: unknown;
  name?: string;
  fn?: string | MathNode;
  op?: string;
  implicit?: boolean;
  args?: MathNode[];
  content?: MathNode;
  toString(): string;
}

interface Compiled {
  fn: Closure;
  usesZ: boolean;
  bounds: I.Bounds;
  slope: I.Bounds;
}

const ZERO: I.Interval = [0, 0];
const ONE: I.Interval = [1, 1];
const noSlope: I.Bounds = () => ZERO;

function isZero(a: I.Interval): boolean {
  return a[0] === 0 && a[1] === 0;
}

/**
 * Derivative of a ^ b from the value bounds (va, vb) and derivative bounds (da, db):
 * b a^(b - 1) a' + a^b ln(a) b', each term only where its factor a' or b' is not exactly 0.
 */
function powerSlope(va: I.Interval, vb: I.Interval, da: I.Interval, db: I.Interval): I.Interval {
  let d = ZERO;
  if (!isZero(da) && !isZero(vb)) d = I.multiply(I.multiply(vb, I.power(va, I.subtract(vb, ONE))), da);
  if (!isZero(db)) d = I.add(d, I.multiply(I.multiply(I.power(va, vb), I.logarithm(va, Math.log)), db));
  return d;
}

const NODE_WORDS: Record<string, string> = {
  AssignmentNode: 'an assignment',
  FunctionAssignmentNode: 'a function definition',
  AccessorNode: 'property or index access',
  IndexNode: 'an index',
  ArrayNode: 'a matrix or list',
  ObjectNode: 'an object',
  ConditionalNode: 'a conditional',
  RangeNode: 'a range',
  RelationalNode: 'a comparison',
  BlockNode: 'several statements',
};

/**
 * The grammar's tokens: decimal numbers (digits, optional point, optional exponent), names
 * (letters, digits, underscores), the operators + - * / ^, parentheses, commas and blanks.
 * Anything else is refused before the parser sees it: mathjs would otherwise read "5%" as a
 * percentage, "# ..." as a comment, "0x10", "0b101" and "0o17" as hexadecimal, binary and octal
 * numbers, and quotes, brackets and dots as strings, matrices and property access.
 */
const TOKEN = /\s+|(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?|[A-Za-z_][A-Za-z0-9_]*|[-+*/^(),]/y;

/**
 * Why `text` is not made of the grammar's tokens, or undefined when it is. With `onlySilent`,
 * only the characters and numbers mathjs would read without complaint are reported.
 */
function lexicalProblem(text: string, onlySilent = false): string | undefined {
  let at = 0;
  let prev = '';
  while (at < text.length) {
    TOKEN.lastIndex = at;
    const m = TOKEN.exec(text);
    if (!m) {
      const c = text[at]!;
      if (onlySilent && c !== '%' && c !== '#') {
        at += 1;
        prev = c;
        continue;
      }
      const word =
        c === '%' ? ' (percentages and the remainder are not allowed)' : c === '#' ? ' (comments are not allowed)' : '';
      return `contains the character "${c}"${word}`;
    }
    const tok = m[0];
    // "0x10", "0b101", "0o17": hexadecimal, binary and octal numbers are not decimal numbers.
    if (prev === '0' && /^[xXbBoO]/.test(tok)) {
      return `contains "${short(prev + tok)}", which is not a decimal number (write numbers in decimal)`;
    }
    if (!/^\s/.test(tok)) prev = tok;
    else prev = ' ';
    at = TOKEN.lastIndex;
  }
  return undefined;
}

/** The name a factor of an implicit product starts with, when it is not z (e.g. "Mpc" of "Mpc^-3"). */
function unitName(node: MathNode): string | undefined {
  if (node.type === 'SymbolNode') return node.name === 'z' ? undefined : node.name;
  if (node.type === 'OperatorNode' && (node.fn === 'pow' || node.fn === 'divide' || node.fn === 'multiply'))
    return node.args?.[0] ? unitName(node.args[0]) : undefined;
  return undefined;
}

function short(s: string): string {
  const t = s.replace(/\s+/g, ' ').trim();
  return t.length > 40 ? t.slice(0, 37) + '...' : t;
}

/** A number, then "+" a number, then "-" a number, and nothing else (groups: the three numbers). */
const NUMBER_TEXT = String.raw`(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?`;
const ASYMMETRIC_ERRORS = new RegExp(
  String.raw`^\s*([-+]?${NUMBER_TEXT})\s*\+\s*(${NUMBER_TEXT})\s*-\s*(${NUMBER_TEXT})\s*$`,
);

/**
 * Parse, check and compile `text`. Throws SurveyError bad_expression naming `keyPath` and the
 * offending token for anything outside the allowed set; nothing is evaluated before that check.
 */
export function compileExpression(written: string, file: string, keyPath: string): CompiledExpression {
  // The typeset minus sign (U+2212) of a value pasted from a paper is a minus.
  const text = written.replace(/\u2212/g, '-');
  const fix = `use only numbers, z, + - * / ^, parentheses and ${ALLOWED_FUNCTIONS}`;
  const reject = (what: string): never => {
    throw inputError('bad_expression', file, keyPath, `the expression "${short(written)}" ${what}`, fix);
  };
  if (text.length > MAX_EXPRESSION_LENGTH) reject(`is longer than ${MAX_EXPRESSION_LENGTH} characters`);
  if (text.trim() === '') reject('is empty');
  // What mathjs would accept silently ("5%", "# ...", "0x10") is refused before it parses;
  // everything else outside the grammar is named by the tree check below, token by token.
  const silent = lexicalProblem(text, true);
  if (silent) reject(silent);
  // A dash pasted where a minus is meant ("–2.06"): named, since it looks like one.
  const dash = /[\u2010-\u2015\ufe58\ufe63\uff0d]/.exec(text);
  if (dash) {
    const code = dash[0].charCodeAt(0).toString(16).toUpperCase();
    reject(`contains "${dash[0]}" (U+${code}, a dash), not the minus sign "-"`);
  }
  // "-2.06 +- 0.13" (a value and its error, pasted from a paper) would read as -2.06 + (-0.13).
  // Only the two signs written together: "a + -b*z", as a program writes a negative term, is read.
  const signs = /\+-|-\+|[±∓]|[\^_]\s*\{/.exec(text);
  if (signs) {
    const s = signs[0];
    const what = s.includes('{')
      ? 'an error as typeset (^{+a}_{-b})'
      : /[±∓]/.test(s)
        ? 'a value and its error'
        : 'a sign after a sign, as a value and its error are written';
    throw inputError(
      'bad_expression',
      file,
      keyPath,
      `the expression "${short(written)}" writes "${s}", ${what}`,
      "give the value alone with one sign (a 1-sigma error belongs in the population's model_uncertainty)",
    );
  }
  // "-2.06+0.13-0.10" (a value and its asymmetric errors, pasted from a paper's table) would read
  // as -2.03: three bare numbers joined by "+" and then "-", and nothing else, are refused.
  const asymmetric = ASYMMETRIC_ERRORS.exec(text);
  if (asymmetric) {
    throw inputError(
      'bad_expression',
      file,
      keyPath,
      `the expression "${short(written)}" writes a number followed by +${asymmetric[2]} and -${asymmetric[3]}, as a value and its upper and lower errors are written`,
      `give the value alone (${asymmetric[1]}); a 1-sigma error belongs in the population's model_uncertainty`,
    );
  }
  let root: MathNode;
  try {
    // The common forms without building mathjs's parser; the rest (and every error) through mathjs.
    root = quickParse(text) ?? getParser().parse(text);
  } catch (e) {
    const msg =
      e instanceof RangeError ? 'nests too deeply' : (e as Error).message.replace(/\.$/, '').replace(/\s+/g, ' ');
    return reject(`cannot be read (${msg})`);
  }

  const walk = (node: MathNode): Compiled => {
    switch (node.type) {
      case 'ConstantNode': {
        const v = node.value;
        if (typeof v !== 'number') return reject(`contains ${JSON.stringify(v) ?? String(v)}, which is not a number`);
        const b: I.Interval = [v, v];
        return { fn: () => v, usesZ: false, bounds: () => b, slope: noSlope };
      }
      case 'SymbolNode': {
        if (node.name === 'z') return { fn: (z) => z, usesZ: true, bounds: (lo, hi) => [lo, hi], slope: () => ONE };
        return reject(`contains "${node.name}"; the only variable is z`);
      }
      case 'ParenthesisNode':
        return walk(node.content as MathNode);
      case 'OperatorNode': {
        const args = node.args ?? [];
        if (node.implicit) {
          const unit = args.map(unitName).find((u) => u !== undefined);
          if (unit !== undefined) {
            // "0.29e-3 Mpc^-3", "-20.87 mag": a unit where the key's own unit is implied.
            throw inputError(
              'bad_expression',
              file,
              keyPath,
              `the expression "${short(written)}" writes "${short(unit)}" after a number, as a unit is written`,
              "write the number alone, in the key's own unit (docs/survey-file.md gives each key's unit)",
            );
          }
          return reject(`writes "${short(node.toString())}" without a "*" between the factors`);
        }
        const c = args.map(walk);
        const usesZ = c.some((x) => x.usesZ);
        const [a, b] = c;
        let fn: Closure;
        let bounds: I.Bounds;
        let slope: I.Bounds;
        if (c.length === 1 && a) {
          const fa = a.fn;
          const ba = a.bounds;
          const da = a.slope;
          if (node.fn === 'unaryMinus') {
            fn = (z) => -fa(z);
            bounds = (lo, hi) => I.negate(ba(lo, hi));
            slope = (lo, hi) => I.negate(da(lo, hi));
          } else if (node.fn === 'unaryPlus') {
            fn = fa;
            bounds = ba;
            slope = da;
          } else return reject(`contains the operator "${node.op}"`);
        } else if (c.length === 2 && a && b) {
          const fa = a.fn;
          const fb = b.fn;
          const ba = a.bounds;
          const bb = b.bounds;
          const da = a.slope;
          const db = b.slope;
          let op: (x: I.Interval, y: I.Interval) => I.Interval;
          switch (node.fn) {
            case 'add':
              fn = (z) => fa(z) + fb(z);
              op = I.add;
              slope = (lo, hi) => I.add(da(lo, hi), db(lo, hi));
              break;
            case 'subtract':
              fn = (z) => fa(z) - fb(z);
              op = I.subtract;
              slope = (lo, hi) => I.subtract(da(lo, hi), db(lo, hi));
              break;
            case 'multiply':
              fn = (z) => fa(z) * fb(z);
              op = I.multiply;
              // (ab)' = a'b + ab'
              slope = (lo, hi) => I.add(I.multiply(da(lo, hi), bb(lo, hi)), I.multiply(ba(lo, hi), db(lo, hi)));
              break;
            case 'divide':
              fn = (z) => fa(z) / fb(z);
              op = I.divide;
              // (a/b)' = (a'b - ab') / b^2
              slope = (lo, hi) => {
                const vb = bb(lo, hi);
                const top = I.subtract(I.multiply(da(lo, hi), vb), I.multiply(ba(lo, hi), db(lo, hi)));
                return I.divide(top, I.power(vb, [2, 2]));
              };
              break;
            case 'pow':
              fn = (z) => fa(z) ** fb(z);
              op = I.power;
              slope = (lo, hi) => powerSlope(ba(lo, hi), bb(lo, hi), da(lo, hi), db(lo, hi));
              break;
            default:
              return reject(`contains the operator "${node.op}"`);
          }
          bounds = (lo, hi) => op(ba(lo, hi), bb(lo, hi));
        } else {
          return reject(`contains the operator "${node.op}"`);
        }
        return fold({ fn, usesZ, bounds, slope });
      }
      case 'FunctionNode': {
        const f = node.fn as MathNode;
        if (f.type !== 'SymbolNode' || typeof f.name !== 'string') {
          return reject(`calls "${short(f.toString())}", which is not a known function`);
        }
        const name = f.name;
        const args = node.args ?? [];
        const unary = Object.prototype.hasOwnProperty.call(UNARY, name) ? UNARY[name] : undefined;
        const variadic = Object.prototype.hasOwnProperty.call(VARIADIC, name) ? VARIADIC[name] : undefined;
        if (!unary && !variadic) return reject(`calls "${name}", which is not an allowed function`);
        const c = args.map(walk);
        const usesZ = c.some((x) => x.usesZ);
        if (unary) {
          if (c.length !== 1) return reject(`calls ${name} with ${c.length} arguments instead of 1`);
          const fa = c[0]!.fn;
          const ba = c[0]!.bounds;
          const da = c[0]!.slope;
          const bu = UNARY_BOUNDS[name]!;
          const su = UNARY_SLOPES[name]!;
          if (folding && name === 'abs' && usesZ) kinks.push(fa);
          return fold({
            fn: (z) => unary(fa(z)),
            usesZ,
            bounds: (lo, hi) => bu(ba(lo, hi)),
            slope: (lo, hi) => su(ba(lo, hi), da(lo, hi)),
          });
        }
        if (c.length < 1) return reject(`calls ${name} without arguments`);
        const fs = c.map((x) => x.fn);
        const bs = c.map((x) => x.bounds);
        const ds = c.map((x) => x.slope);
        const bv = VARIADIC_BOUNDS[name]!;
        const bounds: I.Bounds = (lo, hi) => bv(bs.map((g) => g(lo, hi)));
        // min and max take the derivative of one of their arguments (a kink where they switch)
        const slope: I.Bounds = (lo, hi) => I.union(ds.map((g) => g(lo, hi)));
        if (folding)
          for (let i = 0; i < c.length; i++)
            for (let j = i + 1; j < c.length; j++) {
              const [gi, gj] = [fs[i]!, fs[j]!];
              if (c[i]!.usesZ || c[j]!.usesZ) kinks.push((z) => gi(z) - gj(z));
            }
        const v = variadic!;
        if (fs.length === 2) {
          const [fa, fb] = fs as [Closure, Closure];
          return fold({ fn: (z) => v(fa(z), fb(z)), usesZ, bounds, slope });
        }
        return fold({ fn: (z) => v(...fs.map((g) => g(z))), usesZ, bounds, slope });
      }
      default: {
        const word = NODE_WORDS[node.type] ?? `"${node.type}"`;
        return reject(`contains ${word} ("${short(node.toString())}")`);
      }
    }
  };

  // First pass: check every node (nothing is evaluated). Second pass: compile with constant folding
  // and collect the kinks.
  let folding = false;
  const kinks: Closure[] = [];
  const fold = (c: Compiled): Compiled => {
    if (!folding || c.usesZ) return c;
    const v = c.fn(0);
    const b: I.Interval = [v, v];
    return { fn: () => v, usesZ: false, bounds: () => b, slope: noSlope };
  };
  walk(root);
  const rest = lexicalProblem(text);
  if (rest) reject(rest);
  folding = true;
  const compiled = walk(root);
  return {
    text: written,
    fn: compiled.fn,
    constant: !compiled.usesZ,
    bounds: compiled.bounds,
    slope: compiled.slope,
    kinks: compiled.usesZ ? kinks : [],
  };
}
