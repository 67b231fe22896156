/**
 * The redshift quadrature's order search where its largest order (256 nodes from a start of 8)
 * does not converge (src/counts/engine.ts chooseRedshiftNodes): the piece is halved and each half
 * chosen again, and what still has not converged after MAX_HALVINGS halvings is listed
 * (`unconverged`) and said in the outputs (the warning redshift_integral_unconverged of predict and
 * forecast). Before, the rule stopped at its largest order and returned it silently: a forecast's
 * slice holding a spike between a phi* table's rows (which its density grid does not cut at) was
 * 2.7e-3 low (test/counts/narrow-features.test.ts checks that case against scipy).
 *
 * Sources (calculus; common practice):
 * - the integral of 1 + |z - c| over [0, 1] is 1 + (c^2 + (1 - c)^2) / 2. Tolerance 1e-10
 *   relative for the kink, which the halving isolates (the rule's own target is 1e-8 per piece; its
 *   largest order alone, 480 nodes from its start at 60 for a piece 1 wide, erred by 2.7e-6).
 * - A cosine of 3,000 periods over a piece (not of whole periods, which the rule's symmetric nodes
 *   would cancel) cannot be followed by 24 halvings of 256 nodes each: it must be listed, with the
 *   share its last two orders differ by above 1e-7.
 * - predict cuts at a table's rows (src/counts/engine.ts parameterBreaks), the forecast's grid does
 *   not: a phi* table zigzagging every 0.0025 in z (400 kinks) is beyond the forecast's halvings, so
 *   its outputs must warn (a plan's too: its grid is the forecast's), and predict's must not.
 */
import { describe, expect, test } from 'vitest';
import { chooseRedshiftNodes, MAX_HALVINGS, UNCONVERGED_SHARE, unconvergedShare } from '../../src/counts/engine.js';
import { unconvergedWarning } from '../../src/counts/warnings.js';
import { loadSurveyFile, loadSurveyText } from '../../src/survey/load.js';
import { predict } from '../../src/counts/predict.js';
import { forecast } from '../../src/forecast/forecast.js';
import { plan } from '../../src/library/plan.js';
import { readdirSync, readFileSync } from 'node:fs';

const sum = (r: { z: number[]; w: number[] }, f: (z: number) => number): number =>
  r.z.reduce((a, z, i) => a + r.w[i]! * f(z), 0);

describe('chooseRedshiftNodes where 256 nodes do not converge', () => {
  test('a kink no cut marks: the piece is halved until it converges, to 1e-10', () => {
    const c = 0.3137;
    const f = (z: number) => 1 + Math.abs(z - c);
    const exact = 1 + (c * c + (1 - c) ** 2) / 2;
    const r = chooseRedshiftNodes(0, 1, f);
    expect(r.unconverged).toBeUndefined();
    expect(Math.abs(sum(r, f) / exact - 1)).toBeLessThan(1e-10);
  });

  test('a cosine of 3,000 periods: listed as unconverged, its share above the warning threshold', () => {
    const k = 2 * Math.PI * 3000.37;
    const f = (z: number) => 1 + 0.5 * Math.cos(k * z);
    const r = chooseRedshiftNodes(0.5, 1.61, f);
    expect(r.unconverged?.length).toBeGreaterThan(0);
    const m = unconvergedShare(r, f)!;
    expect(m.share).toBeGreaterThan(UNCONVERGED_SHARE);
    expect(m.z).toBeGreaterThan(0.5);
    expect(m.z).toBeLessThan(1.61);
    const w = unconvergedWarning(
      'pop',
      [{ zMin: 0.5, zMax: 1.61, quadratureMissed: m }],
      UNCONVERGED_SHARE,
      MAX_HALVINGS,
    );
    expect(w?.code).toBe('redshift_integral_unconverged');
    expect(w?.message).toMatch(/^pop: the integral over redshift of the slice 0\.5-1\.61 did not converge/);
  });

  test('a share at or below the threshold is not warned about', () => {
    const slices = [{ zMin: 1, zMax: 2, quadratureMissed: { share: UNCONVERGED_SHARE, z: 1.5 } }];
    expect(unconvergedWarning('pop', slices, UNCONVERGED_SHARE, MAX_HALVINGS)).toBeUndefined();
  });
});

describe("the forecast's grid cuts where the intergalactic transmission jumps, as predict does", () => {
  // Lyman alpha redshifted across a 0.55 um band at z = 3.52, inside the slice 3.5-4: at 8cba134 the
  // forecast's slice was 1.7e-4 off predict's (the grid's nodes stepped over the jump); predict's
  // counts with the jump are checked against the Madau 1995 references in test/selection
  test('both slices equal predict to 1e-9', async () => {
    const text = `
title: Invented dropout-like field, Lyman alpha crossing the band inside a slice
cosmology: {h0: 70, omega_m: 0.3}
area: 0.1
redshift: {min: 3.0, max: 4.0}
detection: {kind: magnitude, limit: 27.0, band: "0.55 um", igm: madau1995}
population: {variable: magnitude, phi_star: 1.2e-3, m_star: -20.8, alpha: -1.7}
slices: {count: 2}
`;
    const survey = loadSurveyText(text, 'igm-jump.yaml');
    const p = predict(survey, { noUncertainty: true, model: { draws: 0 } });
    const f = await forecast(survey, { cosmicVariance: false, mocks: 0 });
    if (p.breakdown !== 'redshift') throw new Error('expected slices in redshift');
    const off = f.slices.map((s, i) => Math.abs(s.count / p.slices[i]!.count - 1)).filter((r) => !(r < 1e-9));
    expect(off).toEqual([]);
  });
});

describe('the outputs say so', () => {
  const rows = Array.from({ length: 401 }, (_, i) => `[${(1 + i * 0.0025).toFixed(4)}, ${i % 2 === 0 ? -2.9 : -3.3}]`);
  const text = `
title: Invented survey whose log10 phi* table zigzags every 0.0025 in z
cosmology: {h0: 70, omega_m: 0.3}
area: 0.5
redshift: {min: 1.0, max: 2.0}
detection: {kind: line_flux, limit: 3e-17, line: 6563}
population:
  variable: luminosity
  log10_phi_star: {table: [${rows.join(', ')}]}
  log10_l_star: 42.4
  alpha: -1.5
slices: {count: 2}
`;

  test("a forecast whose grid cannot follow a table's 400 kinks warns, naming the slices", async () => {
    const f = await forecast(loadSurveyText(text, 'zigzag.yaml'), { cosmicVariance: false, mocks: 0 });
    const w = f.warnings.filter((x) => x.code === 'redshift_integral_unconverged');
    expect(w.length).toBe(1);
    expect(w[0]!.message).toMatch(
      /^population: the integral over redshift of the slices 1-1\.5, 1\.5-2 did not converge/,
    );
  });

  test("a plan, whose density grid is the forecast's, warns too", async () => {
    // samples/plan-uv-deep-wide.yaml over z = 4-6 in one slice, with an M* table zigzagging every
    // 0.01, 2 exposures 1 to 1.2 h (the grid's nodes after 24 halvings make its depth tables slow:
    // few of them)
    const rows = Array.from(
      { length: 201 },
      (_, i) => `[${(4 + i * 0.01).toFixed(2)}, ${i % 2 === 0 ? -20.6 : -21.2}]`,
    );
    const sample = readFileSync(new URL('../../samples/plan-uv-deep-wide.yaml', import.meta.url), 'utf8')
      .replace('redshift: {min: 4, max: 8}', 'redshift: {min: 4, max: 6}')
      .replace('slices: {width: 1}', 'slices: {count: 1}')
      .replace('m_star: "-20.9 + 0.1*(z - 6)"', `m_star: {table: [${rows.join(', ')}]}`)
      .replace(
        'exposure_grid: {min_hours: 0.1, max_hours: 60, count: 200}',
        'exposure_grid: {min_hours: 1, max_hours: 1.2, count: 2}',
      );
    expect(sample).toContain('m_star: {table:');
    expect(sample).toContain('min_hours: 1, max_hours: 1.2');
    const p = await plan(loadSurveyText(sample, 'plan-zigzag.yaml'), { cosmicVariance: false });
    const w = p.warnings.filter((x) => x.code === 'redshift_integral_unconverged');
    expect(w.length).toBe(1);
    expect(w[0]!.message).toMatch(
      /^UV-selected galaxies: the integral over redshift of the slice 4-6 did not converge/,
    );
  });

  test('predict, which cuts at the rows, converges and does not warn', () => {
    const p = predict(loadSurveyText(text, 'zigzag.yaml'), { noUncertainty: true, model: { draws: 0 } });
    expect(p.warnings.map((x) => x.code)).not.toContain('redshift_integral_unconverged');
  });

  test('no bundled sample warns', async () => {
    const samples = readdirSync(new URL('../../samples/', import.meta.url)).filter((f) => f.endsWith('.yaml'));
    const warned: string[] = [];
    for (const s of samples) {
      const survey = loadSurveyFile(new URL(`../../samples/${s}`, import.meta.url).pathname);
      const p = predict(survey, { noUncertainty: true, model: { draws: 0 } });
      if (p.warnings.some((x) => x.code === 'redshift_integral_unconverged')) warned.push(`predict ${s}`);
      for (const population of survey.populations) {
        const f = await forecast(survey, { population: population.name, cosmicVariance: false, mocks: 0 }).catch(
          () => undefined,
        );
        if (f?.warnings.some((x) => x.code === 'redshift_integral_unconverged')) warned.push(`forecast ${s}`);
      }
    }
    expect(warned).toEqual([]);
  });
});
