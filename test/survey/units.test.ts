import { describe, expect, test } from 'vitest';
import { SurveyError } from '../../src/errors.js';
import { parseQuantity, type QuantityKind } from '../../src/survey/units.js';
import { FULL_SKY_DEG2, SR_PER_DEG2 } from '../../src/model/sky.js';
import { loadSurveyText } from '../../src/survey/load.js';

const F = 'units.yaml';
const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

describe('unit conversions against published definitions (relative tolerance 1e-14 unless stated)', () => {
  // [input, kind, expected plain number, source of the expected value]
  const cases: [string | number, QuantityKind, number, string][] = [
    [2.5, 'area', 2.5, 'plain number: deg^2 (docs/survey-file.md)'],
    ['2.5', 'area', 2.5, 'bare number string: deg^2'],
    ['3600 arcmin^2', 'area', 1, '1 deg = 60 arcmin, so 1 deg^2 = 3600 arcmin^2 (exact, by definition)'],
    ['900 arcmin^2', 'area', 0.25, '1 deg^2 = 3600 arcmin^2'],
    ['2.5 deg2', 'area', 2.5, '"deg2" is deg^2 as papers write it (common practice)'],
    ['900 arcmin2', 'area', 0.25, '"arcmin2" is arcmin^2 (common practice); 1 deg^2 = 3600 arcmin^2'],
    ['12960000 arcsec2', 'area', 1, '"arcsec2" is arcsec^2 (common practice); 1 deg^2 = 1.296e7 arcsec^2'],
    ['12960000 arcsec^2', 'area', 1, '1 deg = 3600 arcsec, so 1 deg^2 = 1.296e7 arcsec^2'],
    ['2.5 deg²', 'area', 2.5, 'a typeset superscript power: deg² is deg^2 (Unicode superscript two, common practice)'],
    ['900 arcmin²', 'area', 0.25, 'arcmin² is arcmin^2; 1 deg^2 = 3600 arcmin^2'],
    ['5e-17 erg s⁻¹ cm⁻²', 'flux', 5e-17, 'erg s⁻¹ cm⁻² as papers typeset it is erg/s/cm^2 (common practice)'],
    ['5e-20 W m⁻²', 'flux', 5e-17, '1 W m^-2 = 1e3 erg/s/cm^2 (1 W = 1e7 erg/s, 1 m^2 = 1e4 cm^2)'],
    [
      '5e−17 erg/s/cm^2',
      'flux',
      5e-17,
      'a typeset minus sign (U+2212) in a pasted exponent is a minus (common practice; refused before as not starting with a number)',
    ],
    ['2.1e−6 m', 'wavelength', 21000, 'U+2212 minus: 2.1e-6 m = 2.1 um = 21000 Angstrom'],
    [
      '−2.5',
      'area',
      -2.5,
      'a bare number with the typeset minus reads as -2.5 (the area key then refuses a negative area)',
    ],
    ['1 sr', 'area', (180 / Math.PI) ** 2, '1 sr = 1 rad^2 = (180/pi)^2 deg^2 (SI brochure, 9th ed., Table 4)'],
    ['0.01 sr', 'area', 0.01 * (180 / Math.PI) ** 2, '1 sr = (180/pi)^2 deg^2'],
    [6563, 'wavelength', 6563, 'plain number: Angstrom'],
    ['1 um', 'wavelength', 1e4, '1 um = 1e-6 m, 1 Angstrom = 1e-10 m (SI prefixes; IAU style manual)'],
    ['2.1 um', 'wavelength', 21000, '1 um = 1e4 Angstrom'],
    ['2.1 micron', 'wavelength', 21000, 'micron = micrometre'],
    ['2.1 microns', 'wavelength', 21000, 'micron = micrometre'],
    ['2.1 µm', 'wavelength', 21000, 'micro sign spelling'],
    ['656.3 nm', 'wavelength', 6563, '1 nm = 10 Angstrom'],
    ['6563 Angstrom', 'wavelength', 6563, 'Angstrom spelled out'],
    ['6563 angstroms', 'wavelength', 6563, 'Angstrom, lower case plural'],
    ['6563 Å', 'wavelength', 6563, 'Angstrom sign'],
    ['1e-6 m', 'wavelength', 1e4, '1 m = 1e10 Angstrom'],
    [5e-17, 'flux', 5e-17, 'plain number: erg/s/cm^2'],
    ['5e-17 erg/s/cm^2', 'flux', 5e-17, 'same unit'],
    ['1 W/m^2', 'flux', 1e3, '1 W = 1e7 erg/s, 1 m^2 = 1e4 cm^2 (SI/cgs definitions)'],
    ['5e-20 W/m^2', 'flux', 5e-17, '1 W/m^2 = 1e3 erg/s/cm^2'],
    ['5e-17 erg s^-1 cm^-2', 'flux', 5e-17, 'negative-power notation'],
    [3, 'time', 3, 'plain number: hours'],
    ['3 h', 'time', 3, 'h = hour'],
    ['90 min', 'time', 1.5, '1 h = 60 min'],
    ['5400 s', 'time', 1.5, '1 h = 3600 s'],
  ];
  test.each(cases)('%s (%s) -> %d: %s', (input, kind, expected) => {
    expect(rel(parseQuantity(input, kind, F, 'k'), expected)).toBeLessThan(1e-14);
  });

  test('full sky is 4 pi sr = 41252.96 deg^2 (common practice: 4 pi (180/pi)^2, to 0.01 deg^2)', () => {
    expect(FULL_SKY_DEG2).toBeCloseTo(41252.96, 2);
    expect(rel(FULL_SKY_DEG2 * SR_PER_DEG2, 4 * Math.PI)).toBeLessThan(1e-15);
  });
});

describe('units that are wrong, missing or unknown are errors naming the key', () => {
  const bad: [string, QuantityKind][] = [
    ['2.5 deg', 'area'],
    ['2.5 m', 'area'],
    ['2.5 furlongs', 'area'],
    ['arcmin^2', 'area'],
    ['', 'area'],
    ['6563 A', 'wavelength'],
    ['6563 s', 'wavelength'],
    ['5e-17 W', 'flux'],
    ['5e-17 erg/s', 'flux'],
    ['3 m', 'time'],
    ['three hours', 'time'],
    ['2 + 3 h', 'time'],
  ];
  test.each(bad)('%j as %s', (input, kind) => {
    let err: unknown;
    try {
      parseQuantity(input, kind, F, 'some.key');
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(SurveyError);
    const e = err as SurveyError;
    expect([e.code, e.keyPath, e.file]).toEqual(['bad_unit', 'some.key', F]);
    expect(e.message).toMatch(/^units\.yaml: some\.key: .*\.$/);
  });
});

describe('"A" written for Angstrom', () => {
  // mathjs reads "A" as the ampere (SI), so "6563 A" was refused as "not a wavelength (expected a
  // unit like Angstrom)", which does not say what was wrong (failed before)
  test.each(['6563 A', '15A', '7e3 A'])('%j names the ampere and writes the Angstrom form', (input) => {
    let err: unknown;
    try {
      parseQuantity(input, 'wavelength', F, 'some.key');
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(SurveyError);
    const e = err as SurveyError;
    expect([e.code, e.keyPath]).toEqual(['bad_unit', 'some.key']);
    const n = input.replace(/\s*A$/, '');
    expect(e.message).toBe(
      `${F}: some.key: "${input}" is a current: "A" is the ampere, not the Angstrom; write "${n} Angstrom" or "${n} Å".`,
    );
  });
  test('an ampere where no wavelength is expected keeps the plain message', () => {
    expect(() => parseQuantity('2 A', 'area', F, 'area')).toThrow(/is not an area \(expected a unit like deg\^2\)/);
  });
});

describe('a magnitude limit written with the typeset minus sign (U+2212)', () => {
  const file = (limit: string) => `format: 1
title: t
cosmology: {h0: 70, omega_m: 0.3}
area: 1
redshift: {min: 6.5, max: 7.5}
detection: {kind: magnitude, limit: "${limit}", band: "1.25 um"}
population: {variable: magnitude, rest_wavelength: 1600, phi_star: 0.29e-3, m_star: -20.87, alpha: -2.06}
`;
  test('is read as a magnitude and refused by its range, not read as a flux density of -29.5 Jy (failed before)', () => {
    let err: unknown;
    try {
      loadSurveyText(file('\u221229.5'), F);
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(SurveyError);
    expect((err as SurveyError).keyPath).toBe('detection.limit');
    expect((err as Error).message).toContain('-29.5 AB mag');
    expect((err as Error).message).not.toContain('Jy');
    // a bare number string is the same magnitude as the number (docs/survey-file.md)
    expect(loadSurveyText(file('29.5'), F).detection).toEqual(
      loadSurveyText(file('29.5').replace('"29.5"', '29.5'), F).detection,
    );
  });
});
