/** The completeness as a function of the observed value: its definition, and one function per curve. */
import { describe, expect, test } from 'vitest';
import { completenessFunction } from '../../src/selection/completeness.js';
import type { Completeness } from '../../src/model/detection.js';

describe('completenessFunction', () => {
  test('the logistic is 1/2 at its half point and falls towards faint sources (docs/survey-file.md, "Completeness")', () => {
    const c: Completeness = { model: 'logistic', half: 24, width: 0.2 };
    const f = completenessFunction(c, 'magnitude', 'magnitude');
    expect(f(24)).toBe(0.5);
    // 1 / (1 + e^1) one width fainter (worked by hand)
    expect(f(24.2)).toBeCloseTo(1 / (1 + Math.E), 13);
    expect(f(23)).toBeGreaterThan(f(25));
    // a line flux's variable is -log10 flux: brighter means a larger obs
    const g = completenessFunction({ model: 'logistic', half: 16.5, width: 0.1 }, 'line_flux', 'luminosity');
    expect(g(-16.5)).toBe(0.5);
    expect(g(-16)).toBeGreaterThan(g(-17));
  });
  test('a table is interpolated linearly and its end fractions held', () => {
    const f = completenessFunction({ model: 'table', x: [27, 28], fraction: [0.9, 0.5] }, 'magnitude', 'magnitude');
    expect(f(27.5)).toBeCloseTo(0.7, 15);
    expect(f(20)).toBe(0.9);
    expect(f(30)).toBe(0.5);
  });
  test('one function per curve, kind and variable, made once: every population of a survey calls the same', () => {
    const c: Completeness = { model: 'logistic', half: 24, width: 0.2 };
    const f = completenessFunction(c, 'magnitude', 'magnitude');
    expect(completenessFunction(c, 'magnitude', 'magnitude')).toBe(f);
    // another kind or variable is another function, with its own orientation
    const t = completenessFunction(c, 'threshold', 'luminosity');
    expect(t).not.toBe(f);
    expect(t(24.2)).toBeCloseTo(1 / (1 + Math.exp(-1)), 13);
    // an equal curve given as another object is made afresh, with the same numbers
    const other = completenessFunction({ ...c }, 'magnitude', 'magnitude');
    expect(other).not.toBe(f);
    for (const x of [22, 23.9, 24, 24.35, 30]) expect(other(x)).toBe(f(x));
  });
});
