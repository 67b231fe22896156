/**
 * The range of a parameter given as an expression in z is checked at every redshift of its window,
 * not only at the 64 points sampled: a spike narrower than their spacing is refused (one sentence
 * naming the file, the key and a z inside the spike; exit 2, nothing written), a narrow feature
 * that stays in range is accepted. The ranges are those of src/model/limits.ts (a fraction in
 * [0, 1], attenuation in [0, 20] mag, alpha in [-4, 4], phi* up to 1e3 Mpc^-3, bias positive).
 *
 * The spikes are gaussians of width 0.002 at z = 4.1 in the window z = 3-5 of MAGNITUDE_YAML,
 * whose 64 evenly spaced points (3 + 2k/63) come no nearer than 0.011 (5.5 widths) to 4.1: the
 * test `the sampled points miss every spike` shows each would pass a check at those points alone.
 */
import fc from 'fast-check';
import { existsSync, readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { parse, stringify } from 'yaml';
import { compileExpression } from '../../src/survey/expressions.js';
import { parseSurveyObject } from '../../src/survey/index.js';
import { MAGNITUDE_YAML, setPath } from './fixtures.js';
import { errorOf } from '../support/survey-error.js';
import { tempDir } from '../support/temp.js';
import { runCli } from '../cli/helpers.js';

const FILE = 'spiky.yaml';
const SPIKE = 'exp(-((z - 4.1)/0.002)^2)';
/** The spike's half width where its height is still above 1/e^(1/4) (0.78): |z - 4.1| < 0.001. */
const NEAR = 0.001;

function surveyObject(edits: Record<string, unknown>): Record<string, unknown> {
  const obj = parse(MAGNITUDE_YAML) as Record<string, unknown>;
  for (const [k, v] of Object.entries(edits)) setPath(obj, k, v);
  return obj;
}

/** Each spiky expression, the key it is written under and what is wrong at the spike's top. */
const REFUSED: { key: string; text: string; code: string; word: RegExp }[] = [
  { key: 'detection.redshift_selection', text: `0.5 + 0.7*${SPIKE}`, code: 'out_of_range', word: /fraction kept/ },
  { key: 'population.redshift_selection', text: `0.6 - 0.9*${SPIKE}`, code: 'out_of_range', word: /fraction kept/ },
  { key: 'population.attenuation', text: `0.3 - 0.5*${SPIKE}`, code: 'out_of_range', word: /attenuation/ },
  { key: 'population.alpha', text: `-1.8 - 3*${SPIKE}`, code: 'out_of_range', word: /alpha/ },
  // log10_phi_star reaches 4 at the top: phi* = 1e4 Mpc^-3, above its 1e3
  { key: 'population.log10_phi_star', text: `-3 + 7*${SPIKE}`, code: 'out_of_range', word: /phi_star/ },
  { key: 'population.bias', text: `2 - 3*${SPIKE}`, code: 'out_of_range', word: /bias/ },
  // no real value within 0.001 of z = 4.1 (a square root of a negative number), 0.5 elsewhere
  {
    key: 'population.alpha',
    text: '-1.8 + 0*sqrt(((z - 4.1)/0.001)^2 - 1)',
    code: 'bad_expression',
    word: /has no real value/,
  },
];

/** Narrow features that stay in range: each must load. */
const ACCEPTED: { key: string; text: string }[] = [
  { key: 'detection.redshift_selection', text: `0.5 + 0.4*${SPIKE}` },
  // the top is exactly the bound 1 (exp(0) = 1), reached at z = 4.1 exactly
  { key: 'detection.redshift_selection', text: SPIKE },
  { key: 'detection.redshift_selection', text: `1 - ${SPIKE}` },
  { key: 'population.attenuation', text: `0.3 - 0.3*${SPIKE}` },
  { key: 'population.alpha', text: `-1.8 - 2.2*${SPIKE}` },
  { key: 'population.log10_phi_star', text: `-3 + 5.9*${SPIKE}` },
  { key: 'population.bias', text: `2 - 1.9*${SPIKE}` },
  { key: 'detection.redshift_selection', text: 'min(1, max(0, 2.5 - 0.5*z))' },
];

describe('a parameter as an expression in z is checked at every redshift of its window', () => {
  test('the sampled points miss every spike (so each case below tests more than them)', () => {
    const points = Array.from({ length: 64 }, (_, k) => (k === 63 ? 5 : 3 + (2 * k) / 63));
    const nearest = Math.min(...points.map((z) => Math.abs(z - 4.1)));
    // 3 + 35*2/63 = 4.1111: 0.0111 from the top, 5.5 widths (exact arithmetic)
    expect(nearest).toBeCloseTo(0.0111, 4);
    const spike = compileExpression(SPIKE, FILE, 'k').fn;
    expect(Math.max(...points.map(spike))).toBeLessThan(1e-13);
  });

  test.each(REFUSED)('$key: "$text" is refused naming a z inside the spike', ({ key, text, code, word }) => {
    const e = errorOf(() => parseSurveyObject(surveyObject({ [key]: text }), FILE));
    expect(e.code).toBe(code);
    expect(e.keyPath).toBe(key);
    expect(e.message).toMatch(word);
    expect(e.message.startsWith(`${FILE}: ${key}: `)).toBe(true);
    expect(e.message).toMatch(/for every z from 3 to 5\.$/);
    const z = Number(/at z = ([0-9.]+)/.exec(e.message)?.[1]);
    expect(Math.abs(z - 4.1)).toBeLessThan(NEAR);
  });

  test.each(ACCEPTED)('$key: "$text" stays in range and is accepted', ({ key, text }) => {
    const survey = parseSurveyObject(surveyObject({ [key]: text }), FILE);
    expect(survey.populations).toHaveLength(1);
  });

  test('predict refuses the spiky file with one sentence, exit 2, and writes nothing', async () => {
    const dir = tempDir('skytally-spike-');
    const file = join(dir, FILE);
    writeFileSync(file, stringify(surveyObject({ 'detection.redshift_selection': `0.5 + 0.7*${SPIKE}` })));
    const out = join(dir, 'out.json');
    const r = await runCli(['predict', file, '--format', 'json', '--out', out]);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toContain(`${file}: detection.redshift_selection: the fraction kept is 1.`);
    expect(existsSync(out)).toBe(false);
    expect(readdirSync(dir)).toEqual([FILE]);
  });
});

describe('interval bounds of an expression', () => {
  // common practice (the inclusion property of interval arithmetic): every value the compiled
  // closure returns for a z in [lo, hi] lies within the bounds made for [lo, hi]
  const TEMPLATES = [
    (a: number, b: number) => `${a} + ${b}*exp(-((z - 2)/0.01)^2)`,
    (a: number, b: number) => `log10(${Math.abs(a) + 0.1} + z) * ${b}`,
    (a: number, b: number) => `(z - ${a})^3 / (${Math.abs(b) + 1} + z^2)`,
    (a: number, b: number) => `sqrt(abs(z - ${a})) - min(z, ${b}, 2*z)`,
    (a: number, b: number) => `10^(${a / 10} - 0.2*z) + max(${b}, ln(1 + z))`,
    (a: number, b: number) => `(${a} - z)^(-2) * ${b}`,
    (a: number, b: number) => `(1 + z)^(${b / 3}) - z/(1 + z)^2 + ${a}`,
    (a: number, b: number) => `-(z*${a})^2 + exp(${b}*z)`,
  ];
  test('hold every value of the closure inside them', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 0, max: TEMPLATES.length - 1 }),
        fc.double({ min: -5, max: 5, noNaN: true }),
        fc.double({ min: -5, max: 5, noNaN: true }),
        fc.double({ min: 0, max: 6, noNaN: true }),
        fc.double({ min: 1e-9, max: 3, noNaN: true }),
        (t, a, b, lo, width) => {
          const text = TEMPLATES[t]!(Number(a.toPrecision(6)), Number(b.toPrecision(6)));
          const e = compileExpression(text, FILE, 'k');
          const hi = lo + width;
          const [blo, bhi] = e.bounds(lo, hi);
          const outside: string[] = [];
          for (let i = 0; i <= 64; i++) {
            const z = i === 64 ? hi : lo + ((hi - lo) * i) / 64;
            const v = e.fn(z);
            if (Number.isNaN(blo)) continue;
            if (!(v >= blo && v <= bhi)) outside.push(`${text} at z = ${z}: ${v} not in [${blo}, ${bhi}]`);
          }
          if (outside.length > 0) throw new Error(outside.slice(0, 3).join('; '));
        },
      ),
      { numRuns: 2000, seed: 12 },
    );
  });

  test('are exact at the top of a peak that reaches a bound, and undefined where no real value may be', () => {
    const peak = compileExpression(SPIKE, FILE, 'k');
    expect(peak.bounds(4.09, 4.11)[1]).toBe(1);
    expect(peak.bounds(4.09, 4.11)[0]).toBeGreaterThanOrEqual(0);
    const root = compileExpression('sqrt(z - 1)', FILE, 'k');
    expect(root.bounds(0.5, 2).every(Number.isNaN)).toBe(true);
    expect(root.bounds(1, 2)).toEqual([0, 1]);
    expect(compileExpression('1/(z - 1)', FILE, 'k').bounds(0.5, 2).every(Number.isNaN)).toBe(true);
  });
});

describe('a value out of range is refused in words that fit how it is written', () => {
  // MAGNITUDE_YAML's window is z = 3 to 5. Failed before: a constant was refused "at z = 3" with the
  // fix "for every z from 3 to 5", as if it varied; an expression's fix asked for "a value".
  test.each([
    ['a number', -5, 'alpha is -5, outside its physical range (from -4 to 4); give a value in that range.'],
    [
      'an expression without z',
      'log10(1e-5)',
      'alpha is -5, outside its physical range (from -4 to 4); give a value in that range.',
    ],
    [
      'a table',
      {
        table: [
          [3, -1.5],
          [4, -5],
          [5, -1.5],
        ],
      },
      'alpha is -5 at z = 4, outside its physical range (from -4 to 4); give values in that range for every z from 3 to 5.',
    ],
  ])('%s', (_what, alpha, text) => {
    const e = errorOf(() => parseSurveyObject(surveyObject({ 'population.alpha': alpha }), FILE));
    expect(e.code).toBe('out_of_range');
    expect(e.message).toBe(`${FILE}: population.alpha: ${text}`);
  });

  test('an expression in z: the z where it fails, and the fix for the expression over the window', () => {
    // -z leaves the range beyond z = 4: the first of the 64 points past it is 3 + 2*32/63 = 4.01587
    const e = errorOf(() => parseSurveyObject(surveyObject({ 'population.alpha': '-z' }), FILE));
    expect(e.message).toBe(
      `${FILE}: population.alpha: alpha is -4.01587 at z = 4.01587, outside its physical range (from -4 to 4); change the expression so that it stays in that range for every z from 3 to 5.`,
    );
  });

  test('a constant that must be positive, and a constant expression that is infinite', () => {
    const bias = errorOf(() => parseSurveyObject(surveyObject({ 'population.bias': 0 }), FILE));
    expect(bias.message).toBe(`${FILE}: population.bias: the bias is 0 but must be positive; give a value above 0.`);
    const inf = errorOf(() => parseSurveyObject(surveyObject({ 'population.alpha': '1/(1-1)' }), FILE));
    expect(inf.message).toBe(
      `${FILE}: population.alpha: the expression "1/(1-1)" is infinite; change it so that it is finite.`,
    );
  });
});
