/**
 * A spectrum file's second column may hold f_nu or nu f_nu when its header says so
 * (src/survey/spectrum-file.ts): far-infrared and submillimetre spectra are usually tabulated that
 * way, and one read as f_lambda gave an 850 um count 80 times too small without a word.
 *
 * Checks: a spectrum flat in f_nu written as a constant f_nu column (or as nu f_nu proportional to
 * 1 / lambda) has K(z) = -2.5 log10(1 + z) in every band (Hogg et al. 2002, arXiv:astro-ph/0210394,
 * from eq. 8; docs/survey-file.md), so its limits equal those of the power law beta = -2 to 1e-5
 * mag (the rows become f_lambda, read linearly between them: 1.2e-6 mag seen with rows 0.2 %
 * apart); a modified blackbody (T = 35 K, emissivity index 1.5; common
 * practice for submillimetre galaxies) written as f_nu counts what the same spectrum converted by
 * hand to f_lambda = f_nu / lambda^2 counts (1e-9: the two files differ only by rounding in the
 * conversion); a column named as a logarithm is refused.
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { loadSurveyText, predict } from '../../src/index.js';
import { errorOf } from '../support/survey-error.js';
import { tempDir } from '../support/temp.js';

const dir = tempDir('spectrum-columns-');
// 2,000 rows (the cap), 0.21 % apart: each row is turned into f_lambda and read linearly between
// rows, which bends a flat f_nu (f_lambda ~ lambda^-2) between them by up to 3e-6 of itself
// (1.2e-6 mag seen in a limit)
const lambdaUm = Array.from({ length: 2000 }, (_, i) => 40 * (2500 / 40) ** (i / 1999));

function write(name: string, header: string, value: (um: number) => number): string {
  writeFileSync(join(dir, name), `${header}\n${lambdaUm.map((l) => `${l}, ${value(l)}`).join('\n')}\n`);
  return name;
}

function survey(spectrum: string | undefined): string {
  const detection = spectrum
    ? `band: {center: "850 um", fwhm: "85 um"}\n  sed: {file: ${spectrum}}`
    : `band: "850 um"\n  beta: -2`;
  return `format: 1
title: 850 um blank field
cosmology: {h0: 70, omega_m: 0.3}
area: 2
redshift: {min: 0.5, max: 6}
detection:
  kind: magnitude
  limit: "4 mJy"
  ${detection}
population:
  variable: magnitude
  rest_wavelength: "850 um"
  phi_star: 3e-5
  m_star: -26.6
  alpha: -1.5
slices: {count: 5}
`;
}

const run = (spectrum: string | undefined) =>
  predict(loadSurveyText(survey(spectrum), join(dir, 'survey.yaml')), { noUncertainty: true });

// f_nu of a modified blackbody, T = 35 K, emissivity index 1.5 (lambda in um; any unit)
const mbb = (um: number) => {
  const nu = 2.99792458e14 / um;
  return (nu ** 1.5 * nu ** 3) / Math.expm1((6.62607015e-34 * nu) / (1.380649e-23 * 35));
};

describe('spectrum files in f_nu and nu f_nu', () => {
  test('a spectrum flat in f_nu, as f_nu or as nu f_nu, has the limits of the power law beta = -2', () => {
    const flat = run(undefined).slices!;
    for (const file of [
      write('flat-fnu.csv', 'wavelength_um, f_nu_mjy', () => 2.5),
      write('flat-snu.csv', 'wavelength_um, S_nu', () => 1),
      write('flat-jy.csv', 'wavelength_um, flux_jy', () => 0.3),
      write('flat-bracket.csv', 'wavelength_um, f_nu[mJy]', () => 0.7),
      write('flat-flux-bracket.csv', 'wavelength_um, flux(mJy)', () => 0.7),
      write('flat-nufnu.csv', 'wavelength_um, nu_f_nu', (um) => 1 / um),
    ]) {
      const p = run(file);
      p.slices!.forEach((s, i) => expect(Math.abs(s.limit_at_center! - flat[i]!.limit_at_center!)).toBeLessThan(1e-5));
    }
    // read as f_lambda (as every file was before), the flat column is beta = 0, which needs
    // sources 5 log10(1 + z) mag brighter: the limit at z = 3.25 is 3.1 mag brighter
    const asLambda = run(write('flat-flambda.csv', 'wavelength_um, f_lambda', () => 1)).slices!;
    expect(flat[2]!.limit_at_center! - asLambda[2]!.limit_at_center!).toBeGreaterThan(2);
  });

  test('a modified blackbody given as f_nu counts as the same spectrum converted to f_lambda', () => {
    const fnu = run(write('mbb-fnu.csv', 'wavelength_um, f_nu', mbb));
    const flambda = run(write('mbb-flambda.csv', 'wavelength_um, f_lambda', (um) => mbb(um) / (um * um)));
    expect(Math.abs(fnu.totals.count / flambda.totals.count - 1)).toBeLessThan(1e-9);
    // and not as the f_nu column read as f_lambda
    const misread = run(write('mbb-flux.csv', 'wavelength_um, flux', mbb));
    expect(fnu.totals.count / misread.totals.count).toBeGreaterThan(10);
  });

  test('a column named as a logarithm is refused, naming detection.sed.file', () => {
    const file = write('mbb-log.csv', 'wavelength_um, log_nu_l_nu', (um) => Math.log10(mbb(um) * 1e-10 + 1));
    const e = errorOf(() => loadSurveyText(survey(file), join(dir, 'survey.yaml')));
    expect(e.code).toBe('bad_table');
    expect(e.message).toMatch(/detection\.sed\.file/);
    expect(e.message).toMatch(/log_nu_l_nu", a logarithm/);
  });
});
