/**
 * A file that gives detection.limit (or the plan's limits) as a flux density reads its limits in
 * that unit: forecast's limit to reach, compare's limit row and the plan's limits are quoted in it
 * beside AB ("1.55 mJy (15.93 AB)"), and the JSON names the unit (`limit_unit`) while its limits
 * stay AB magnitudes. Each flux density shown is checked against the AB definition computed here,
 * f_nu = 3631 Jy 10^(-0.4 m) (Oke & Gunn 1983 AB definition, m = -2.5 log10(f_nu / 3631 Jy); and to
 * 1e-4 relative the same paper's m = -2.5 log10 f_nu[erg s^-1 cm^-2 Hz^-1] - 48.60, whose zero point
 * lies 6.6e-5 mag from 3631 Jy). A file giving the same limit as its AB number has no `limit_unit`
 * and the tables it had before (AB only).
 */
import { describe, expect, test } from 'vitest';
import {
  compare,
  compareTable,
  forecast,
  forecastTable,
  loadSurveyText,
  plan,
  planTable,
  predict,
  predictionTable,
  type Survey,
} from '../../src/index.js';
import { fluxDensityOfAbMagnitude } from '../../src/model/photometry.js';
import { computeReport, reportHtml, reportSections } from '../../src/library/report.js';
import { precise, sig } from '../../src/render/format.js';
import { readPlanSection } from '../../src/survey/plan-section.js';
import { errorOf } from '../support/survey-error.js';

/** Oke & Gunn 1983 AB definition: the flux density in Jy of an AB magnitude, m = -2.5 log10(f_nu / 3631 Jy). */
const jyOfAb = (m: number) => 3631 * 10 ** (-0.4 * m);
/** Oke & Gunn 1983 AB definition as they wrote it: m = -2.5 log10 f_nu - 48.60, f_nu in erg s^-1 cm^-2 Hz^-1. */
const cgsOfAb4860 = (m: number) => 10 ** (-(m + 48.6) / 2.5);

const file = (limit: string, planSection = '') =>
  `format: 1
title: 850 um field
cosmology: {h0: 70, omega_m: 0.3}
area: 1
redshift: {min: 1, max: 4}
detection: {kind: magnitude, limit: ${limit}, band: "850 um", beta: -5}
population: {variable: magnitude, rest_wavelength: "850 um", phi_star: 3e-5, m_star: -26.6, alpha: -1.5}
slices: {count: 3}
${planSection}`;
const load = (limit: string, planSection = '', name = 'field.yaml'): Survey =>
  loadSurveyText(file(limit, planSection), name);
const AB_4MJY = -2.5 * Math.log10(0.004 / 3631);
const PLAN = (reference: string) => `plan:
  field_of_view: "0.2 deg^2"
  budget_hours: 100
  goal: count
  exposure_grid: {min_hours: 1, max_hours: 50, count: 5}
  reference: {limit: ${reference}, exposure_hours: 10}
`;

describe('limits quoted in the flux-density unit the file used', () => {
  test('the conversion is the AB definition in every unit (Oke & Gunn 1983 AB definition)', () => {
    for (const m of [0, 14.894915643962324, 23.9, 31.4]) {
      const jy = jyOfAb(m);
      const rel = (a: number, b: number) => Math.abs(a / b - 1);
      expect(rel(fluxDensityOfAbMagnitude(m, 'Jy'), jy)).toBeLessThan(1e-12);
      expect(rel(fluxDensityOfAbMagnitude(m, 'mJy'), jy * 1e3)).toBeLessThan(1e-12);
      expect(rel(fluxDensityOfAbMagnitude(m, 'uJy'), jy * 1e6)).toBeLessThan(1e-12);
      expect(rel(fluxDensityOfAbMagnitude(m, 'nJy'), jy * 1e9)).toBeLessThan(1e-12);
      // 1 Jy = 1e-23 erg s^-1 cm^-2 Hz^-1 = 1e-26 W m^-2 Hz^-1 (IAU Style Manual, from memory)
      expect(rel(fluxDensityOfAbMagnitude(m, 'erg/s/cm^2/Hz'), jy * 1e-23)).toBeLessThan(1e-12);
      expect(rel(fluxDensityOfAbMagnitude(m, 'W/m^2/Hz'), jy * 1e-26)).toBeLessThan(1e-12);
      expect(rel(fluxDensityOfAbMagnitude(m, 'erg/s/cm^2/Hz'), cgsOfAb4860(m))).toBeLessThan(1e-4);
    }
  });

  test('the loader keeps the unit as written', () => {
    const unitOf = (limit: string) => {
      const d = load(limit).detection;
      return d.kind === 'magnitude' ? d.limitGivenUnit : 'not magnitude';
    };
    expect(unitOf('"4 mJy"')).toBe('mJy');
    expect(unitOf('"4000 uJy"')).toBe('uJy');
    expect(unitOf('"4000 µJy"')).toBe('uJy');
    expect(unitOf('"0.004 Jy"')).toBe('Jy');
    expect(unitOf('"4e6 nJy"')).toBe('nJy');
    expect(unitOf('"4e-26 erg s^-1 cm^-2 Hz^-1"')).toBe('erg/s/cm^2/Hz');
    expect(unitOf('"4e-29 W m^-2 Hz^-1"')).toBe('W/m^2/Hz');
    expect(unitOf(String(AB_4MJY))).toBeUndefined();
  });

  test("forecast's limit to reach: in mJy and AB; the same file in AB is unchanged", async () => {
    const targets = { alpha: 0.02, m_star: 0.05 };
    const given = await forecast(load('"4 mJy"'), { targets });
    const written = await forecast(load(String(AB_4MJY)), { targets });
    const r = given.requirement!;
    expect(r.limit_unit).toBe('mJy');
    expect(written.requirement!.limit_unit).toBeUndefined();
    // the limits stay AB magnitudes, the same numbers as with the AB number written
    expect(r.limit).toBeCloseTo(written.requirement!.limit!, 6);
    const text = forecastTable(given);
    const before = forecastTable(written);
    let quoted = 0;
    for (const [n, e] of Object.entries(r.by_parameter)) {
      if (e.limit === null) continue;
      const mjy = jyOfAb(e.limit) * 1e3;
      expect(text).toContain(`sigma(${n}) = ${sig(e.target)}: `);
      expect(text).toContain(`a limit of ${sig(mjy, 3)} mJy (${sig(e.limit, 4)} AB) at this area`);
      expect(before).toContain(`a limit of ${sig(written.requirement!.by_parameter[n]!.limit!, 4)} AB at this area`);
      expect(before).not.toContain('mJy');
      quoted++;
    }
    expect(quoted).toBe(2);
  });

  test("forecast's notes quote a searched limit in the file's unit", async () => {
    // a target no limit within 7.5 mag reaches: the note names the deepest limit searched
    const f = await forecast(load('"4e-26 erg s^-1 cm^-2 Hz^-1"'), { targets: { alpha: 1e-6 } });
    const deepest = f.requirement!.search.limit[1]!;
    const note = f.requirement!.by_parameter.alpha!.notes.join(' ');
    expect(note).toContain(
      `even ${precise(jyOfAb(deepest) * 1e-23, 3)} erg/s/cm^2/Hz (${precise(deepest, 3)} AB) gives`,
    );
  });

  test("compare's limit row: each file in its own unit, an AB file as before", async () => {
    const c = await compare([load('"4 mJy"'), load('"2 uJy"'), load('23.5')]);
    expect(c.surveys.map((s) => s.limit_unit)).toEqual(['mJy', 'uJy', undefined]);
    const row = compareTable(c)
      .split('\n')
      .find((l) => l.includes(' limit '))!;
    const lims = c.surveys.map((s) => s.limit as number);
    expect(row).toContain(`${sig(jyOfAb(lims[0]!) * 1e3, 3)} mJy (${lims[0]!.toFixed(2)} AB)`);
    expect(row).toContain(`${sig(jyOfAb(lims[1]!) * 1e6, 3)} uJy (${lims[1]!.toFixed(2)} AB)`);
    expect(row).toContain(`│ 23.50 AB *`);
  });

  test("the plan's limits: in the plan's own unit, else detection.limit's; the report's table too", async () => {
    const p = await plan(load('"4 mJy"', PLAN('"4000 uJy"'), 'plan.yaml'));
    expect(p.limit_unit).toBe('uJy');
    const text = planTable(p);
    expect(text).toContain(`to ${sig(jyOfAb(p.best.limit) * 1e6, 3)} uJy (${p.best.limit.toFixed(2)} AB)`);
    expect(text).toContain(`background-limited from ${sig(jyOfAb(AB_4MJY) * 1e6, 3)} uJy (14.89 AB) in 10 h`);
    for (const d of p.designs)
      expect(text).toContain(`${sig(jyOfAb(d.limit) * 1e6, 3)} uJy (${d.limit.toFixed(2)} AB)`);

    const fromDetection = await plan(load('"4 mJy"', PLAN(String(AB_4MJY)), 'plan.yaml'));
    expect(fromDetection.limit_unit).toBe('mJy');
    const ab = await plan(load(String(AB_4MJY), PLAN(String(AB_4MJY)), 'plan.yaml'));
    expect(ab.limit_unit).toBeUndefined();
    expect(planTable(ab)).not.toMatch(/Jy/);
    expect(ab.designs).toEqual(fromDetection.designs);

    const survey = load('"4 mJy"', PLAN('"4 mJy"'), 'plan.yaml');
    const r = await computeReport('plan.yaml', survey, reportSections({}));
    const html = await reportHtml(r, '', []);
    const planned = r.plan as typeof p;
    expect(html).toContain(
      `<td>${sig(jyOfAb(planned.best.limit) * 1e3, 3)} mJy (${planned.best.limit.toFixed(2)} AB)</td>`,
    );
  });
});

describe("the report's plan table of a line-flux plan", () => {
  test('gives each limit in erg/s/cm^2 to 3 figures, not 0.00', async () => {
    const survey = loadSurveyText(
      `format: 1
title: H-alpha plan
cosmology: {h0: 70, omega_m: 0.3}
area: 1
redshift: {min: 0.8, max: 1.2}
detection: {kind: line_flux, limit: "6e-17 erg/s/cm^2"}
population: {variable: luminosity, line: 6562.8, log10_phi_star: -2.7, log10_l_star: 42.5, alpha: -1.4}
slices: {count: 2}
plan:
  field_of_view: "0.2 deg^2"
  budget_hours: 100
  goal: count
  exposure_grid: {min_hours: 1, max_hours: 50, count: 4}
  reference: {limit: "6e-17 erg/s/cm^2", exposure_hours: 1}
`,
      'line.yaml',
    );
    const r = await computeReport('line.yaml', survey, reportSections({}));
    const html = await reportHtml(r, '', []);
    const planned = r.plan as Awaited<ReturnType<typeof plan>>;
    expect(planned.limit_unit).toBeUndefined();
    expect(html).toContain('limit<br><span class="unit">erg s⁻¹ cm⁻²</span>');
    for (const d of planned.designs) {
      // formatNumber's powers of ten, 3 figures (common practice): 5.2e-17 as 5.2 × 10⁻¹⁷
      const [m, e] = d.limit.toExponential(2).split('e');
      expect(html).toContain(`<td>${Number(m)} × 10<sup>${Number(e)}</sup></td>`);
    }
    expect(html).not.toContain('<td>0.00</td>');
  });
});

describe("a plan's flux-density limit in a refusal", () => {
  const planWith = (lines: string) =>
    load(
      '"4 mJy"',
      `plan:
  field_of_view: "0.2 deg^2"
  budget_hours: 100
  goal: count
  exposure_grid: {min_hours: 1, max_hours: 10, count: 4}
${lines}
`,
      'plan.yaml',
    );
  // the AB magnitude as the message writes it: 4 figures of -2.5 log10(f_nu / 3631 Jy) (Oke & Gunn 1983 AB definition)
  const ab = (jy: number) => Number((-2.5 * Math.log10(jy / 3631)).toPrecision(4));

  test('is quoted as written, with its AB magnitude', () => {
    const outside = errorOf(() => {
      const s = planWith('  depth_law: {table: [[1, "8 mJy"], [10, "2 mJy"]]}\n  fixed: {limit: "1 uJy"}');
      readPlanSection(s, s.populations[0]!);
    });
    expect(outside.keyPath).toBe('plan.fixed.limit');
    expect(outside.message).toContain(`is "1 uJy", AB ${ab(1e-6)}, outside the depth_law table`);
    const shallower = errorOf(() => {
      const s = planWith('  depth_law: {table: [[1, "8 mJy"], [10, "9 mJy"]]}');
      readPlanSection(s, s.populations[0]!);
    });
    expect(shallower.keyPath).toBe('plan.depth_law.table[1][1]');
    expect(shallower.message).toContain(`is not deeper than the row before ("8 mJy", AB ${ab(8e-3)})`);
  });
});

describe("predict's table says the limit was given in the file's unit", () => {
  test.each([
    ['"4000 uJy"', 'uJy', 1e6],
    ['"4e-26 erg s^-1 cm^-2 Hz^-1"', 'erg/s/cm^2/Hz', 1e-23],
    ['"4 mJy"', 'mJy', 1e3],
  ] as const)('%s', (limit, unit, perJy) => {
    const p = predict(load(limit));
    if (p.detection.kind !== 'magnitude') throw new Error('a magnitude detection');
    expect(p.detection.limit_unit).toBe(unit);
    // limit_jy back from limit_ab_mag by the AB definition (Oke & Gunn 1983 AB definition), 1e-12
    expect(Math.abs(p.detection.limit_jy! / jyOfAb(p.detection.limit_ab_mag) - 1)).toBeLessThan(1e-12);
    expect(predictionTable(p)).toContain(
      `AB magnitude limit ${sig(p.detection.limit_ab_mag)} (given as ${sig(jyOfAb(p.detection.limit_ab_mag) * perJy, 4)} ${unit})`,
    );
  });
});
