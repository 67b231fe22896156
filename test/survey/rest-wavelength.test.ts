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
