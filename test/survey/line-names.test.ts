/**
 * A line written as a name ("[OII]", "H-alpha") is refused with the rest wavelength to write: the
 * wavelengths quoted are checked here against the standard air-to-vacuum conversion, and the
 * refusal through the command (exit 2, nothing written).
 */
import { describe, expect, test } from 'vitest';
import { LINE_NAMES, lineNameHint } from '../../src/survey/line-names.js';
import { loadSurveyText } from '../../src/survey/load.js';
import { SurveyError } from '../../src/errors.js';

/** Refractive index of standard air (Morton 2000, ApJS 130, 403, eq. 8, after Edlen 1966; from memory). */
function airIndex(vacuumAngstrom: number): number {
  const s2 = (1e4 / vacuumAngstrom) ** 2;
  return 1 + 8.34254e-5 + 2.406147e-2 / (130 - s2) + 1.5998e-4 / (38.9 - s2);
}

describe('line names: the wavelengths quoted', () => {
  test('air and vacuum wavelengths agree through the refractive index of air to 0.1 Angstrom (Morton 2000)', () => {
    for (const l of LINE_NAMES) {
      if (l.vacuumAngstrom === undefined) continue;
      expect(Math.abs(l.vacuumAngstrom / airIndex(l.vacuumAngstrom) - l.angstrom), l.name).toBeLessThan(0.1);
    }
  });

  test('the usual rest wavelengths (common practice; from memory)', () => {
    const at = (t: string) => /e\.g\. ([\d.]+) /.exec(lineNameHint(t)!)![1];
    expect(at('H-alpha')).toBe('6562.8');
    expect(at('Halpha')).toBe('6562.8');
    expect(at('Hβ')).toBe('4861.3');
    expect(at('[OIII]')).toBe('5006.8');
    expect(at('[O III] 5007')).toBe('5006.8');
    expect(at('[OII]')).toBe('3727.4'); // (3726.03 + 3728.82) / 2 in air
    expect(at('Lyman-alpha')).toBe('1215.67');
    expect(at('Lyα')).toBe('1215.67');
    expect(lineNameHint('Lya')).toContain('in vacuum)');
    // HI 21 cm by its rest frequency, 1420.405751768 MHz (common practice), which `line` takes
    for (const name of ['HI', 'H I', 'HI 21-cm', 'H1'])
      expect(lineNameHint(name), name).toContain('"1420.405752 MHz" or "21.106114 cm"');
    expect(lineNameHint('21 cm')).toBeUndefined(); // a wavelength, read as one
    expect(lineNameHint('6563')).toBeUndefined();
    expect(lineNameHint('foo')).toBeUndefined();
  });
});

describe('a line written as a name is refused with the number to write (failed before: "does not start with a number")', () => {
  const file = (line: string) => `format: 1
title: t
cosmology: {h0: 70, omega_m: 0.3}
area: 1
detection:
  kind: line_flux
  limit: 4e-17
  line: "${line}"
  filter: {center: 11900, fwhm: 130}
population: {variable: luminosity, log10_phi_star: -2.6, log10_l_star: 42.3, alpha: -1.45}
`;
  test.each([
    ['[OII]', '3727.4'],
    ['H-alpha', '6562.8'],
  ])('%s', (name, value) => {
    let err: unknown;
    try {
      loadSurveyText(file(name), 'f.yaml');
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(SurveyError);
    expect((err as SurveyError).keyPath).toBe('detection.line');
    expect((err as SurveyError).code).toBe('bad_unit');
    expect((err as Error).message).toContain(
      `names a line, not its wavelength; write the rest wavelength, e.g. ${value}`,
    );
    // the number it names loads
    expect(loadSurveyText(file(value), 'f.yaml').populations[0]!.lineAngstrom).toBe(Number(value));
  });
});
