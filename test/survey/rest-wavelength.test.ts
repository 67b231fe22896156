/**
 * A population's rest_wavelength says where absolute magnitudes are defined (docs/survey-file.md,
 * "Population keys"). It belongs to the magnitude kind (m = M + DM + K, the k-correction from the
 * rest wavelength to the band; common practice) and labels the luminosity density of absolute
 * magnitudes. A population with variable: luminosity (a line luminosity function, a stellar-mass
 * function) has no such wavelength: `check` does not print one there, and a file that writes one
 * is refused rather than read and silently ignored.
 */
import { describe, expect, test } from 'vitest';
import { parse } from 'yaml';
import { parseSurveyObject } from '../../src/survey/load.js';
import { describeSurvey } from '../../src/survey/describe.js';
import { clone, LINE_YAML, MAGNITUDE_YAML, setPath, THRESHOLD_YAML } from './fixtures.js';
import { errorOf } from '../support/survey-error.js';
import { surveyWarnings } from '../../src/population/warnings.js';
import { predict } from '../../src/counts/predict.js';

const FILE = 'rest-wavelength-test.yaml';

describe('rest_wavelength by detection kind', () => {
  test('a line_flux survey: check shows the line, and no rest wavelength of absolute magnitudes', () => {
    const view = describeSurvey(parseSurveyObject(parse(LINE_YAML) as Record<string, unknown>, FILE));
    expect(view.populations[0]!.line_angstrom).toBeGreaterThan(0);
    expect(view.populations[0]).not.toHaveProperty('rest_wavelength_angstrom');
  });

  test('a magnitude survey: check shows the 1500 Angstrom default, and a given value', () => {
    const raw = parse(MAGNITUDE_YAML) as Record<string, unknown>;
    expect(describeSurvey(parseSurveyObject(clone(raw), FILE)).populations[0]!.rest_wavelength_angstrom).toBe(1500);
    const given = clone(raw);
    setPath(given, 'population.rest_wavelength', '2300 Angstrom');
    expect(describeSurvey(parseSurveyObject(given, FILE)).populations[0]!.rest_wavelength_angstrom).toBe(2300);
  });

  test('a threshold survey in a luminosity-like quantity (stellar mass) has none either, and refuses one', () => {
    const raw = parse(THRESHOLD_YAML) as Record<string, unknown>;
    const view = describeSurvey(parseSurveyObject(clone(raw), FILE));
    expect(view.populations[0]).not.toHaveProperty('rest_wavelength_angstrom');
    const given = clone(raw);
    setPath(given, 'populations.0.rest_wavelength', 1500);
    const e = errorOf(() => parseSurveyObject(given, FILE));
    expect(e.code).toBe('kind_mismatch');
    expect(e.message).toContain('populations[0].rest_wavelength');
  });

  test('a line_flux survey that writes rest_wavelength is refused, naming the key and the fix', () => {
    const raw = clone(parse(LINE_YAML) as Record<string, unknown>);
    setPath(raw, 'population.rest_wavelength', 2000);
    const e = errorOf(() => parseSurveyObject(raw, FILE));
    expect(e.code).toBe('kind_mismatch');
    expect(e.message).toContain(FILE);
    expect(e.message).toContain('population.rest_wavelength');
    expect(e.message).toContain('line luminosity function');
    expect(e.message).toMatch(/remove it/);
  });

  test("a rest wavelength written as a band name is refused with a rest-frame example, 1500, not the observed band's 15000 (failed before)", () => {
    // "FUV" for a GALEX-like function (Wyder et al. 2005 quote absolute magnitudes in FUV, 1528 A;
    // from memory): the example showed 15000, a rest wavelength of 1.5 um, ten times the usual one
    const raw = clone(parse(MAGNITUDE_YAML) as Record<string, unknown>);
    setPath(raw, 'population.rest_wavelength', 'FUV');
    const e = errorOf(() => parseSurveyObject(raw, FILE));
    expect(e.message).toContain('population.rest_wavelength');
    expect(e.message).toContain('e.g. 1500,');
    expect(e.message).not.toContain('15000');
    // the observed band keeps its own example
    const band = clone(parse(MAGNITUDE_YAML) as Record<string, unknown>);
    setPath(band, 'detection.band', 'F150W');
    expect(errorOf(() => parseSurveyObject(band, FILE)).message).toContain('e.g. 15000,');
  });
});

describe('rest_wavelength_below_lyman_limit: a rest wavelength in nm written as a plain number', () => {
  // MAGNITUDE_YAML writes rest_wavelength: "150 nm" (1500 Angstrom) and its band at 1.5 um; 150 alone
  // is 150 Angstrom, below the Lyman limit (912 Angstrom), where no luminosity function is measured.
  const variant = (rest: unknown, beta?: number): Record<string, unknown> => {
    const raw = parse(MAGNITUDE_YAML) as Record<string, unknown>;
    setPath(raw, 'population.rest_wavelength', rest);
    if (beta !== undefined) setPath(raw, 'detection.beta', beta);
    return raw;
  };
  const codes = (raw: Record<string, unknown>) => surveyWarnings(parseSurveyObject(raw, FILE)).map((w) => w.code);

  test('warned with the form to write; not for "150 nm", 1500 or 912', () => {
    const s = parseSurveyObject(variant(150), FILE);
    const w = surveyWarnings(s).filter((x) => x.code === 'rest_wavelength_below_lyman_limit');
    expect(w).toHaveLength(1);
    expect(w[0]!.message).toMatch(/rest_wavelength: "150 nm"/);
    for (const ok of ['150 nm', 1500, 912])
      expect(codes(variant(ok))).not.toContain('rest_wavelength_below_lyman_limit');
  });

  test('what it changes: with beta = -1.7 the limit in M moves by 2.5 (beta + 2) log10(10) = 0.75 mag (the colour term of K(z))', () => {
    const at = (rest: unknown) =>
      predict(parseSurveyObject(variant(rest, -1.7), FILE)).slices!.map((s) => s.limit_at_center!);
    const nm = at('150 nm');
    const aa = at(150);
    // K = ... - 2.5 (beta + 2) log10(band / ((1 + z) rest)): a rest wavelength ten times shorter lowers
    // K by 0.75, so M_lim = m_lim - K is 0.75 fainter
    nm.forEach((m, i) => expect(aa[i]! - m).toBeCloseTo(0.75, 9));
  });
});
