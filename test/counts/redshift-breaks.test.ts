/**
 * Where the count's integrand in z has a feature that the count without completeness does not
 * show, the redshift quadrature must cut there (src/counts/engine.ts: completenessCrossings,
 * parameterBreaks; src/selection/completeness.ts: completenessBreaks for the threshold kind's
 * luminosity variable). Found by a docs-only check of random survey files.
 *
 * Source of every expected number: an independent evaluator written from docs/survey-file.md and
 * docs/outputs.md alone (test/reference/generate/blind_random.py: flat LCDM distances, the Schechter
 * function in u = ln(L/L*) on Gauss-Legendre panels cut at the limit, every 1.5 logistic widths and
 * at the bins' edges, the redshift integral on 20-point panels halved until the halves agree with the
 * whole to 1e-11 of the slice), checked on the first file against scipy.integrate.quad nested in z and
 * log10 L (epsrel 1e-11): the two agree to 1e-15. Tolerance 1e-9 relative.
 */
import { describe, expect, test } from 'vitest';
import { loadSurveyText } from '../../src/survey/load.js';
import { predict } from '../../src/counts/predict.js';
import { makeZParam } from '../../src/survey/zparam.js';

const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

describe('redshift cuts where the completeness or a tabulated parameter changes the integrand', () => {
  test.each([0.1, 0.5, 1])(
    'a threshold limit rising through a logistic of width 0.0171 dex: the count does not depend on histogram.width (%s)',
    (width) => {
      // before: 8e-8 off with bins of 0.1 dex, 2.5e-4 low with 0.5, 9.4e-4 high with 1 (the bins' edges
      // were the only cuts in z, and the order came from the count without completeness)
      const text = `
cosmology: {h0: 70, omega_m: 0.3}
area: 1
redshift: {min: 0.42, max: 5.31}
detection:
  kind: threshold
  limit: "10.474 + 0.3445*(z - 2.8655)"
  completeness: {half: 10.601, width: 0.0171}
population: {variable: luminosity, log10_l_star: "11.1683 + 0.1191*(z - 2.8655)", log10_phi_star: -2.9746, alpha: -0.5245}
slices: {count: 1}
histogram: {width: ${width}}
`;
      const p = predict(loadSurveyText(text, 'crossing.yaml'), { model: { draws: 0 } });
      expect(rel(p.totals.count, 36726.87438246685)).toBeLessThan(1e-9);
    },
  );

  test('a luminosity threshold 22 logistic widths below its half point counts the faint sources at their own completeness', () => {
    // c = 1 / (1 + exp((12 - log10 Q) / 0.5)) is 2.8e-10 at the limit; it was held at its value 20
    // widths below the half point (2e-9) over the faint end: 2.1e-3 too many with alpha = -2.3
    const text = `
cosmology: {h0: 70, omega_m: 0.3}
area: 1
redshift: {min: 0.5, max: 1}
detection:
  kind: threshold
  limit: 1
  completeness: {half: 12, width: 0.5}
population: {variable: luminosity, log10_l_star: 10, log10_phi_star: -3, alpha: -2.3}
slices: {count: 1}
`;
    const p = predict(loadSurveyText(text, 'faint.yaml'), { model: { draws: 0 } });
    expect(rel(p.totals.count, 964765.487332573)).toBeLessThan(1e-9);
  });

  test('a phi* table with rows inside the slice: count and total luminosity density', () => {
    // before: the count 2.7e-6 low and the total density 2.7e-6 low (no cut at the rows)
    const text = `
cosmology: {h0: 70, omega_m: 0.3}
area: 1
redshift: {min: 3, max: 4}
detection: {kind: threshold, limit: 9.5}
population:
  variable: luminosity
  log10_l_star: 10.8
  log10_phi_star: {table: [[3.3, -3.0], [3.45, -3.4], [3.8, -3.1]]}
  alpha: -1.2
slices: {count: 1}
`;
    const p = predict(loadSurveyText(text, 'phi-table.yaml'), { model: { draws: 0 } });
    expect(rel(p.totals.count, 29268.34376941855)).toBeLessThan(1e-9);
    expect(rel(p.totals.luminosity_density!.total!, 55805234.58861656)).toBeLessThan(1e-9);
    expect(rel(p.totals.luminosity_density!.detected, 50460570.45201564)).toBeLessThan(1e-9);
  });

  test('photometric redshifts with a phi* row inside the window: every measured slice', () => {
    // before: the row cut a piece of the true range (at most sigma (1 + z) wide near a measured
    // edge) in two, each from 2 nodes, too few for P(slice | z): the slices 1.6e-6 to 2.7e-6 off
    const text = `
cosmology: {h0: 69.79, omega_m: 0.1504}
area: 0.126492
redshift: {min: 0.6192, max: 0.8302}
detection:
  kind: magnitude
  limit: 25.746
  band: "274349.0 um"
  beta: 0.477
  completeness: {table: [[23.746, 0.97], [24.746, 0.8], [25.546, 0.3]]}
  photo_z: {sigma: 0.038}
population:
  variable: magnitude
  m_star: -21.5351
  log10_phi_star_dex: {table: [[0.7381, -4.14316], [1.2971, -4.45854]]}
  alpha: -0.2672
  rest_wavelength: "1.4 GHz"
slices: {count: 5}
`;
    const p = predict(loadSurveyText(text, 'photoz-row.yaml'), { model: { draws: 0 } });
    const want = [1.208355816519762, 1.2916369907951606, 1.353145019107395, 1.3870379344818953, 1.394235462324109];
    p.slices!.forEach((s, i) => expect(rel(s.count, want[i]!)).toBeLessThan(1e-9));
  });

  test('an alpha table with rows inside a window that detects almost nothing: the total luminosity density', () => {
    // The total (all sources) rides on the count's nodes; pieces cut at the rows started from 2
    // nodes, enough for the count's 1e-12 sources but not for phi* L* Gamma(alpha + 2) over the
    // slice: before, 1.8e-7 off in the second slice with the rows cut (5.5e-5 in a file that also
    // cut on equivalent width; 1.4e-8 and 7e-7 before the rows were cut)
    const text = `
cosmology: {h0: 72.65, omega_m: 0.4272}
area: 0.0754
redshift: {min: 1.3218, max: 3.9092}
detection: {kind: line_flux, limit: 8.79e-16, line: 6562.8}
population:
  variable: luminosity
  log10_l_star: "41.2555 - 0.19*(z - 2.6155)"
  phi_star_dex: 0.000167
  alpha: {table: [[1.4083, -1.26896], [2.7494, -1.17779], [3.6265, -1.10757], [4.5007, -1.05782]]}
slices: {count: 3}
`;
    const p = predict(loadSurveyText(text, 'alpha-table.yaml'), { model: { draws: 0 } });
    const want = [2.3317918178532946e37, 1.5157306301095837e37, 9.833386748176406e36];
    p.slices!.forEach((s, i) => expect(rel(s.luminosity_density!.total!, want[i]!)).toBeLessThan(1e-9));
    expect(rel(p.totals.count, 1.3890138750422702e-12)).toBeLessThan(1e-9);
  });

  test('an M* table with rows inside the slice: count and total luminosity density (L_nu from 3631 Jy)', () => {
    // before: the count 1.3e-6 high, the total density 2e-6 off besides the zero point's 6.0e-5
    const text = `
cosmology: {h0: 70, omega_m: 0.3}
area: 0.1
redshift: {min: 1, max: 5.5}
detection: {kind: magnitude, limit: 27, band: 10800}
population:
  variable: magnitude
  m_star: {table: [[3.3, -19.4], [4.2, -20.4]]}
  phi_star: 3.2e-4
  alpha: -1.32
slices: {count: 1}
`;
    const p = predict(loadSurveyText(text, 'mstar-table.yaml'), { model: { draws: 0 } });
    expect(rel(p.totals.count, 1776.7249402301813)).toBeLessThan(1e-9);
    expect(rel(p.totals.luminosity_density!.total!, 1.6274406273581957e25)).toBeLessThan(1e-9);
    expect(rel(p.totals.luminosity_density!.detected, 8.802331482181488e24)).toBeLessThan(1e-9);
  });
});

describe('redshift cuts where a parameter given as an expression has a kink (min, max, abs)', () => {
  const survey = (phi: string, mStar: string) => `
cosmology: {h0: 70, omega_m: 0.3}
area: 5
redshift: {min: 0.5, max: 6}
detection: {kind: magnitude, limit: 14.9, band: "850 um", beta: -5, completeness: {half: 14.77, width: 0.15}}
population: {variable: magnitude, rest_wavelength: "850 um", log10_phi_star: ${phi}, m_star: ${mStar}, alpha: -1.5}
slices: {edges: [0.5, 1, 2, 3, 4, 6]}
`;
  test('log10 phi* = -4 - 2 max(z - 2.3, 0) and M* = -26.6 + 0.4 max(2.5 - z, 0) count as the same functions written as tables', () => {
    // Tables are linear between rows, so these tables are the expressions exactly; the quadrature
    // cuts at a table's rows (checked against the independent evaluator above). The expressions'
    // kinks were not cut: the slice holding them was 3.6e-6 off (the docs promise counts to 1e-6).
    const expr = predict(
      loadSurveyText(survey('"-4 - 2*max(z - 2.3, 0)"', '"-26.6 + 0.4*max(2.5 - z, 0)"'), 'kinks.yaml'),
      { model: { draws: 0 } },
    );
    const table = predict(
      loadSurveyText(
        survey('{table: [[0.5, -4], [2.3, -4], [6, -11.4]]}', '{table: [[0.5, -25.8], [2.5, -26.6], [6, -26.6]]}'),
        'tables.yaml',
      ),
      { model: { draws: 0 } },
    );
    expr.slices!.forEach((s, i) => expect(rel(s.count, table.slices![i]!.count)).toBeLessThan(1e-9));
    expect(rel(expr.totals.count, table.totals.count)).toBeLessThan(1e-9);
  });

  test('a redshift selection and an attenuation with kinks, and a threshold limit with one, count as the same tables', () => {
    const count = (text: string) =>
      predict(loadSurveyText(text, 'k.yaml'), { model: { draws: 0 } }).slices!.map((s) => s.count);
    // before: the slice holding the selection's and the attenuation's kinks 3.4e-6 off
    const effects = (sel: string, att: string) => `
cosmology: {h0: 70, omega_m: 0.3}
area: 1
redshift: {min: 0.5, max: 3}
detection: {kind: magnitude, limit: 25, band: "8000 Angstrom", beta: -2, redshift_selection: ${sel}}
population: {variable: magnitude, rest_wavelength: 8000, phi_star: 3e-3, m_star: -21, alpha: -1.2, attenuation: ${att}}
slices: {edges: [0.5, 1, 2, 3]}
`;
    const a = count(effects('"min(1, max(0, 3*(z - 1.2)))"', '"0.5 + max(0, 1.4 - z)"'));
    const b = count(
      effects(
        '{table: [[0.5, 0], [1.2, 0], [1.5333333333333333, 1], [3, 1]]}',
        '{table: [[0.5, 1.4], [1.4, 0.5], [3, 0.5]]}',
      ),
    );
    a.forEach((x, i) => expect(x === b[i] || rel(x, b[i]!) < 1e-12).toBe(true));
    // before: 3.4e-9 off (the limit's crossings of the completeness steps cut near the kink)
    const limit = (l: string) => `
cosmology: {h0: 70, omega_m: 0.3}
area: 1
redshift: {min: 0.2, max: 3}
detection: {kind: threshold, limit: ${l}, completeness: {half: 9.3, width: 0.1}}
population: {variable: luminosity, log10_l_star: 10.8, log10_phi_star: -3, alpha: -1.3}
slices: {edges: [0.2, 1, 2, 3]}
`;
    const c = count(limit('"9 + 1.5*max(z - 1.3, 0)"'));
    const d = count(limit('{table: [[0.2, 9], [1.3, 9], [3, 11.55]]}'));
    c.forEach((x, i) => expect(rel(x, d[i]!)).toBeLessThan(1e-12));
  });

  test('the kinks are found where the arguments cross, inside the range asked only', () => {
    const kinks = (text: string, lo: number, hi: number) => makeZParam(text, 'k.yaml', 'k').kinks?.(lo, hi);
    expect(kinks('-4 - 2*max(z - 2.3, 0)', 0.5, 6)).toEqual([expect.closeTo(2.3, 12)]);
    expect(kinks('-4 - 2*max(z - 2.3, 0)', 2.5, 6)).toEqual([]);
    expect(kinks('abs(z - 1) + 3', 0, 4)).toEqual([expect.closeTo(1, 12)]);
    // every pair of min's arguments: z = 2 (z and 2), 1.5 (z and 3 - z), 1 (2 and 3 - z; not a
    // kink of the min, which is z there: one more cut does no harm)
    expect(kinks('min(z, 2, 3 - z)', 0, 4)).toEqual([1, 1.5, 2].map((x) => expect.closeTo(x, 12) as number));
    expect(makeZParam('max(2, 3) + z', 'k.yaml', 'k').kinks).toBeUndefined();
    expect(makeZParam('-1.5 - 0.1*z', 'k.yaml', 'k').kinks).toBeUndefined();
    // a log10 phi* keeps its kinks as phi* (10^value)
    const phi = loadSurveyText(survey('"-4 - 2*max(z - 2.3, 0)"', '-26.6'), 'k.yaml').populations[0]!.components[0]!
      .phiStar;
    expect(phi.kinks?.(0.5, 6)).toEqual([expect.closeTo(2.3, 12)]);
  });
});
