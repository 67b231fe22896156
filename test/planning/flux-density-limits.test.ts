/**
 * A plan's magnitude limits (plan.reference.limit, plan.fixed.limit, the rows of a depth_law
 * table) may be flux densities with their unit, as detection.limit may: a submillimetre or radio
 * plan is written in mJy. Each is its AB magnitude, -2.5 log10(f_nu / 3631 Jy) (common practice;
 * docs/survey-file.md): 4 mJy is AB 14.894915643962324, so the plan section reads exactly as with
 * that number written, and the plan gives the same designs. A plain number stays an AB magnitude;
 * a flux density outside AB 0 to 40, or a line flux, is refused naming the key.
 */
import { describe, expect, test } from 'vitest';
import { loadSurveyText } from '../../src/survey/load.js';
import { readPlanSection } from '../../src/survey/plan-section.js';
import { plan } from '../../src/library/plan.js';
import { errorOf } from '../support/survey-error.js';

const survey = (planSection: string) =>
  loadSurveyText(
    `format: 1
title: 850 um plan
cosmology: {h0: 70, omega_m: 0.3}
area: 1
redshift: {min: 1, max: 4}
detection: {kind: magnitude, limit: "4 mJy", band: "850 um", beta: -5}
population: {variable: magnitude, rest_wavelength: "850 um", phi_star: 3e-5, m_star: -26.6, alpha: -1.5}
slices: {count: 3}
plan:
  field_of_view: "0.2 deg^2"
  budget_hours: 100
  goal: count
  exposure_grid: {min_hours: 1, max_hours: 50, count: 20}
${planSection}
`,
    'plan.yaml',
  );
const spec = (planSection: string) => {
  const s = survey(planSection);
  return readPlanSection(s, s.populations[0]!);
};
const AB_4MJY = -2.5 * Math.log10(0.004 / 3631); // 14.894915643962324

describe('flux densities as plan limits', () => {
  test('reference.limit, fixed.limit and depth_law table rows read as their AB magnitudes', () => {
    expect(AB_4MJY).toBeCloseTo(14.894915643962324, 12);
    const given = spec('  reference: {limit: "4 mJy", exposure_hours: 10}\n  fixed: {limit: "2 mJy"}');
    const written = spec(
      `  reference: {limit: ${AB_4MJY}, exposure_hours: 10}\n  fixed: {limit: ${AB_4MJY + 2.5 * Math.log10(2)}}`,
    );
    expect(given.depthLaw).toEqual(written.depthLaw);
    expect(given.fixed).toEqual({ limit: expect.closeTo((written.fixed as { limit: number }).limit, 12) as number });
    const table = spec('  depth_law: {table: [[1, "8 mJy"], [10, "2.53 mJy"], [100, "800 uJy"]]}');
    expect(table.depthLaw).toMatchObject({ kind: 'table', hours: [1, 10, 100] });
    const limits = (table.depthLaw as { limits: number[] }).limits;
    [0.008, 0.00253, 0.0008].forEach((jy, i) => expect(limits[i]).toBeCloseTo(-2.5 * Math.log10(jy / 3631), 12));
  });

  test('the plan of a file with "4 mJy" is the plan of the same file with its AB magnitude', async () => {
    const a = await plan(survey('  reference: {limit: "4 mJy", exposure_hours: 10}'));
    const b = await plan(survey(`  reference: {limit: ${AB_4MJY}, exposure_hours: 10}`));
    expect(a.best).toEqual(b.best);
    expect(a.designs).toEqual(b.designs);
  });

  test('a flux density outside AB 0 to 40, a line flux or text that is not a unit is refused naming the key', () => {
    const far = errorOf(() => spec('  reference: {limit: "1e-9 nJy", exposure_hours: 10}'));
    expect(far.code).toBe('out_of_range');
    expect(far.message).toMatch(/plan\.reference\.limit/);
    const line = errorOf(() => spec('  reference: {limit: "2e-17 erg/s/cm^2", exposure_hours: 10}'));
    expect(line.message).toMatch(/plan\.reference\.limit/);
    const fixed = errorOf(() => spec('  reference: {limit: 15, exposure_hours: 10}\n  fixed: {limit: "4 mJy/beam"}'));
    expect(fixed.message).toMatch(/plan\.fixed\.limit/);
  });
});
