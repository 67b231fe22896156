/**
 * Where the loader asks the redshift integrals to cut around an expression's narrow feature
 * (src/survey/zparam.ts featureCuts, from interval bounds of the expression's derivative,
 * src/survey/expressions.ts `slope`). The counts these cuts give are checked against scipy in
 * test/counts/narrow-features.test.ts; here: the derivative bounds hold the derivative (the rules of
 * differentiation; common practice), smooth expressions (every sample's) get no cut, so that their
 * counts stay as they were bit for bit, a narrow feature gets cuts graded down to its width, and an
 * expression interval arithmetic cannot resolve is refused in one sentence naming file, key and fix.
 */
import fc from 'fast-check';
import { readdirSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { compileExpression } from '../../src/survey/expressions.js';
import { loadSurveyFile, loadSurveyText } from '../../src/survey/load.js';
import type { ZParam } from '../../src/model/zparam.js';
import { errorOf } from '../support/survey-error.js';

const survey = (selection: string) => `
cosmology: {h0: 70, omega_m: 0.3}
area: 1.0
redshift: {min: 0.8, max: 1.8}
detection:
  kind: line_flux
  limit: 2e-17
  line: 6563
  redshift_selection: "${selection}"
population: {variable: luminosity, phi_star: 1.5e-3, log10_l_star: 42.5, alpha: -1.4}
`;

function selectionOf(text: string): ZParam {
  const s = loadSurveyText(text, 'narrow.yaml');
  return s.detection.redshiftSelection!;
}

describe('bounds of the derivative of an expression in z', () => {
  const EXPRESSIONS = [
    '1 - 0.9*exp(-((z - 1.3)/0.01)^2)',
    '10^(-2.9 - 0.25*(z - 6))',
    'z*exp(-z) + sqrt(z) / (1 + z^2)',
    'ln(1 + z) * log10(2 + z^1.5)',
    'min(1, max(0.2, 3*(z - 1.2))) + abs(z - 1.5)',
    '(1 + z)^(-0.5*z)',
  ];
  test.each(EXPRESSIONS)(
    '%s: the difference quotient between any two points of a cell lies within its bounds',
    (text) => {
      // the mean value theorem: (f(y) - f(x)) / (y - x) is the derivative somewhere between x and y
      // (with a kink, between its one-sided derivatives), so within the bounds over any cell holding both
      const e = compileExpression(text, 'f.yaml', 'k');
      const failures: string[] = [];
      fc.assert(
        fc.property(
          fc.double({ min: 0.05, max: 3, noNaN: true }),
          fc.double({ min: 1e-6, max: 1, noNaN: true }),
          fc.double({ min: 0, max: 0.45, noNaN: true }),
          fc.double({ min: 0.55, max: 1, noNaN: true }),
          (a, width, t1, t2) => {
            const b = a + width;
            const [lo, hi] = e.slope(a, b);
            const [x, y] = [a + t1 * width, a + t2 * width];
            const [fx, fy] = [e.fn(x), e.fn(y)];
            const q = (fy - fx) / (y - x);
            // the quotient's rounding: a few units in the last place of f over y - x
            const slack = (8 * Number.EPSILON * Math.max(Math.abs(fx), Math.abs(fy))) / (y - x) + 1e-12 * Math.abs(q);
            if (!(q >= lo - slack && q <= hi + slack)) failures.push(`[${a}, ${b}]: ${q} not in [${lo}, ${hi}]`);
          },
        ),
        { numRuns: 300, seed: 7 },
      );
      expect(failures).toEqual([]);
    },
  );
});

describe('cuts around a narrow feature', () => {
  test("the samples' expressions get no cut (their counts stay as they were)", () => {
    const dir = join(__dirname, '../../samples');
    const withCuts: string[] = [];
    for (const name of readdirSync(dir).filter((f) => f.endsWith('.yaml'))) {
      const s = loadSurveyFile(join(dir, name));
      const params: [string, ZParam | undefined][] = [];
      for (const p of s.populations) {
        params.push(['l_star', p.lStar], ['m_star', p.mStar]);
        for (const c of p.components) params.push(['phi_star', c.phiStar], ['alpha', c.alpha]);
        params.push(
          ['attenuation', p.attenuation],
          ['selection', p.redshiftSelection ?? s.detection.redshiftSelection],
        );
        for (const [key, q] of params) {
          const cuts = q?.features?.(p.window.min, p.window.max) ?? [];
          if (cuts.length > 0) withCuts.push(`${name} ${p.name} ${key}: ${cuts.length}`);
        }
      }
      if (s.detection.kind === 'threshold' && s.detection.limit.features?.(0, 30).length)
        withCuts.push(`${name} limit`);
    }
    expect(withCuts).toEqual([]);
  });

  test('a dip of width 1e-3 in a window 1 wide: cuts bracket it, graded down to a fraction of its width', () => {
    const p = selectionOf(survey('1 - 0.9*exp(-((z - 1.1)/0.001)^2)'));
    const cuts = p.features!(0.8, 1.8);
    expect(cuts.length).toBeGreaterThan(10);
    expect(cuts.length).toBeLessThan(60);
    // sorted, inside the window
    expect(cuts.every((z, i) => z > 0.8 && z < 1.8 && (i === 0 || z > cuts[i - 1]!))).toBe(true);
    // within two widths of the centre the cuts are no further apart than the width itself
    const near = cuts.filter((z) => Math.abs(z - 1.1) < 0.002);
    expect(near.length).toBeGreaterThan(3);
    const gaps = near.slice(1).map((z, i) => z - near[i]!);
    expect(Math.max(...gaps)).toBeLessThanOrEqual(0.001);
    // asked for a part of the window, only the cuts inside it
    expect(p.features!(1.0, 1.2)).toEqual(cuts.filter((z) => z > 1.0 + 1e-9 && z < 1.2 - 1e-9));
  });

  test("a parameter converted from what the file wrote (log10_phi_star) keeps the written expression's cuts", () => {
    const s = loadSurveyText(
      `
cosmology: {h0: 70, omega_m: 0.3}
area: 0.5
redshift: {min: 1.0, max: 2.0}
detection: {kind: line_flux, limit: 3e-17, line: 6563}
population:
  variable: luminosity
  log10_phi_star: "-2.9 - 0.1*z + 0.8*exp(-((z - 1.37)/0.0007)^2)"
  log10_l_star: 42.4
  alpha: -1.5
`,
      'phi.yaml',
    );
    const cuts = s.populations[0]!.components[0]!.phiStar.features!(1, 2);
    expect(cuts.length).toBeGreaterThan(10);
    expect(cuts.some((z) => Math.abs(z - 1.37) < 0.0007)).toBe(true);
  });

  test("smooth but steep at the window's scale (a gaussian of width 0.3, exp(-30 (z - 0.8))): no cut", () => {
    expect(selectionOf(survey('1 - 0.5*exp(-((z - 1.1)/0.3)^2)')).features!(0.8, 1.8)).toEqual([]);
    expect(selectionOf(survey('exp(-30*(z - 0.8))')).features!(0.8, 1.8)).toEqual([]);
  });

  test('an expression interval arithmetic cannot resolve is refused naming the file, the key and a table as the fix', () => {
    // sqrt(z - z) is 0, but its bounds over any piece are undefined (z - z spans 0 from both sides)
    const e = errorOf(() => loadSurveyText(survey('0.1 + 0.3*z + sqrt(z - z)'), 'narrow.yaml'));
    expect(e.code).toBe('bad_expression');
    expect(e.message).toMatch(
      /^narrow\.yaml: detection\.redshift_selection: the expression "0\.1 \+ 0\.3\*z \+ sqrt\(z - z\)" cannot be shown to change slowly enough near z = [0-9.]+ for the redshift integrals to follow it .*; give it as a table \{table: \[\[z, value\], \.\.\.\]\} with rows across that redshift\.$/,
    );
  });
});
