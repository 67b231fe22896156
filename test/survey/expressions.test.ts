import { describe, expect, test } from 'vitest';
import { SurveyError } from '../../src/errors.js';
import { compileExpression } from '../../src/survey/expressions.js';

const F = 'expr.yaml';
const ZS = [0, 0.1, 0.5, 1, 1.7, 3, 6.5];

describe('allowed expressions evaluate as plain JavaScript Math does (relative tolerance 1e-14)', () => {
  const cases: [string, (z: number) => number][] = [
    ['-1.45 - 0.08*z', (z) => -1.45 - 0.08 * z],
    ['10^(-2.9 + 0.3*z)', (z) => 10 ** (-2.9 + 0.3 * z)],
    ['-z^2', (z) => -(z ** 2)],
    ['2^3^(z/4)', (z) => 2 ** (3 ** (z / 4))],
    ['1 + +z', (z) => 1 + z],
    ['(1 + z)/(2 + z) * 3', (z) => ((1 + z) / (2 + z)) * 3],
    ['log10(1 + z)', (z) => Math.log10(1 + z)],
    ['ln(1 + z)', (z) => Math.log(1 + z)],
    ['exp(-z/2)', (z) => Math.exp(-z / 2)],
    ['sqrt(1 + z)', (z) => Math.sqrt(1 + z)],
    ['abs(z - 1)', (z) => Math.abs(z - 1)],
    ['min(z, 2)', (z) => Math.min(z, 2)],
    ['max(1, z, 3*z - 4)', (z) => Math.max(1, z, 3 * z - 4)],
    ['1e-3 * (1 + z)^2.7 / (1 + ((1 + z)/2.9)^5.6)', (z) => (1e-3 * (1 + z) ** 2.7) / (1 + ((1 + z) / 2.9) ** 5.6)],
    ['42', () => 42],
    ['2*3 + 4', () => 10],
  ];
  test.each(cases)('%s', (text, f) => {
    const e = compileExpression(text, F, 'k');
    for (const z of ZS) {
      const want = f(z);
      const got = e.fn(z);
      expect(Math.abs(got - want)).toBeLessThanOrEqual(1e-14 * Math.abs(want));
    }
    expect(e.constant).toBe(!/z/.test(text));
  });
});

describe('anything else is rejected before it is evaluated', () => {
  const bad = [
    "import('fs')",
    'a = 3',
    'f(x) = x',
    'z.constructor',
    "evaluate('1')",
    '[1,2]',
    '"s"',
    'x + 1',
    'pi * z',
    'e^z',
    'z!',
    '3 % 2',
    'z mod 2',
    'z == 1',
    'z > 1 ? 1 : 2',
    '1:3',
    '{a: 1}',
    'z[1]',
    "z'",
    '2z',
    '2 z',
    '(1 + z)(2 + z)',
    '10^-0.4z',
    'log(z)',
    'log10(z, 2)',
    'sqrt()',
    'min()',
    'cos(z)',
    'z; 1',
    '2 cm',
    '',
    '1 +',
    '('.repeat(5000) + 'z' + ')'.repeat(5000),
    'z + '.repeat(400) + 'z',
  ];
  test.each(bad)('%s', (text) => {
    let err: unknown;
    try {
      compileExpression(text, F, 'population.alpha');
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(SurveyError);
    const e = err as SurveyError;
    expect([e.code, e.keyPath]).toEqual(['bad_expression', 'population.alpha']);
    expect(e.message).not.toMatch(/\n/);
    expect(e.message.endsWith('.')).toBe(true);
  });

  test('the offending token is named', () => {
    const msg = (t: string) => {
      try {
        compileExpression(t, F, 'k');
      } catch (e) {
        return (e as Error).message;
      }
      return '';
    };
    expect(msg("import('fs')")).toContain('"import"');
    expect(msg('x + 1')).toContain('"x"');
    expect(msg('cos(z)')).toContain('"cos"');
    expect(msg('2z')).toContain('"2 z"');
  });

  test('a value and its error pasted from a paper ("-2.06 +- 0.13") is refused, not read as -2.19 (the notation docs/survey-file.md itself uses for errors)', () => {
    const msg = (t: string) => {
      try {
        return String(compileExpression(t, F, 'population.alpha').fn(0));
      } catch (e) {
        expect((e as SurveyError).code).toBe('bad_expression');
        return (e as Error).message;
      }
    };
    for (const [t, sign] of [
      ['-2.06 +- 0.13', '+-'],
      ['-2.06 -+ 0.13', '-+'],
      ['-2.06+-0.13', '+-'],
      ['-1.5 - 0.1*z +-0.2', '+-'],
      ['z -+1', '-+'],
    ]) {
      expect(msg(t!)).toContain(`writes "${sign}"`);
      expect(msg(t!)).toContain('model_uncertainty');
    }
    // signs apart (a negative term as a program writes it: failed when every "+ -" was refused),
    // doubled minus signs, an exponent's sign and unary plus stay as they were
    expect(msg('-1.45 + -0.1*z')).toBe('-1.45');
    expect(compileExpression('-1.45 + -0.1*z', F, 'population.alpha').fn(2)).toBe(-1.45 + -0.1 * 2);
    expect(msg('z - +1')).toBe('-1');
    expect(msg('1 + +z')).toBe('1');
    expect(msg('1 - -2')).toBe('3');
    expect(msg('2e-3 + 1')).toBe(String(2e-3 + 1));
    expect(msg('-2.06 + 0.1*z - 0.3')).toBe(String(-2.06 + 0 - 0.3));
  });

  test('pasted from a paper: the typeset minus sign (U+2212) is a minus; a dash, "±" and a typeset error ^{+a}_{-b} are named', () => {
    const value = (t: string) => compileExpression(t, F, 'population.alpha').fn(2);
    // U+2212 reads as "-" (the same closure values as the ASCII text)
    expect(value('\u22122.06')).toBe(-2.06);
    expect(value('-2.06 \u2212 0.1*z')).toBe(value('-2.06 - 0.1*z'));
    expect(value('10^(\u22122.9 \u2212 0.25*(z \u2212 6))')).toBe(value('10^(-2.9 - 0.25*(z - 6))'));
    expect(compileExpression('\u22122.06', F, 'k').text).toBe('\u22122.06'); // kept as written
    const msg = (t: string) => {
      try {
        compileExpression(t, F, 'population.alpha');
      } catch (e) {
        expect((e as SurveyError).code).toBe('bad_expression');
        return (e as Error).message;
      }
      return '';
    };
    expect(msg('\u20132.06')).toContain('contains "\u2013" (U+2013, a dash), not the minus sign "-"');
    expect(msg('-2.06 \u2014 0.1*z')).toContain('(U+2014, a dash)');
    expect(msg('-2.06 \u00b1 0.13')).toContain('writes "\u00b1", a value and its error');
    expect(msg('\u22122.06 +\u2212 0.13')).toContain('writes "+-"');
    expect(msg('-2.06^{+0.13}_{-0.10}')).toContain('writes "^{", an error as typeset');
    for (const t of ['-2.06 \u00b1 0.13', '-2.06^{+0.13}_{-0.10}']) expect(msg(t)).toContain('model_uncertainty');
  });

  test('a value and its asymmetric errors pasted from a paper ("-2.06+0.13-0.10") is refused, not read as -2.03 (failed before)', () => {
    const msg = (t: string) => {
      try {
        return String(compileExpression(t, F, 'population.alpha').fn(0));
      } catch (e) {
        expect((e as SurveyError).code).toBe('bad_expression');
        return (e as Error).message;
      }
    };
    for (const t of [
      '-2.06+0.13-0.10',
      '-2.06 +0.13 -0.10',
      '-2.06 + 0.13 - 0.10',
      '20.5+1.2e-1-0.3',
      '\u22122.06+0.13\u22120.10',
    ]) {
      const m = msg(t);
      expect(m, t).toContain('upper and lower errors');
      expect(m, t).toContain('model_uncertainty');
    }
    expect(msg('-2.06+0.13-0.10')).toContain('give the value alone (-2.06)');
    // anything with z, or other operators or orders, is an expression and is read
    expect(msg('-2.06 + 0.13*z - 0.1')).toBe(String(-2.06 + 0 - 0.1));
    expect(msg('-2.06 - 0.13 + 0.1')).toBe(String(-2.06 - 0.13 + 0.1));
    expect(msg('1 + 2')).toBe('3');
  });

  test('a unit after a number ("0.29e-3 Mpc^-3", "-20.87 mag") is named as a unit, not as a missing "*"', () => {
    const msg = (t: string) => {
      try {
        compileExpression(t, F, 'population.phi_star');
      } catch (e) {
        return (e as Error).message;
      }
      return '';
    };
    expect(msg('0.29e-3 Mpc^-3')).toContain('writes "Mpc" after a number, as a unit is written');
    expect(msg('-20.87 mag')).toContain('writes "mag" after a number, as a unit is written');
    expect(msg('1e-3 Mpc^-3 / 2')).toContain('"Mpc"');
    expect(msg('-20.87 mag')).toContain("the key's own unit");
    // a missing "*" before z, or between brackets, keeps its own message
    expect(msg('2 z')).toContain('without a "*"');
    expect(msg('(1 + z)(2 + z)')).toContain('without a "*"');
    expect(msg('2 cm')).not.toContain('without a "*"');
  });
});
