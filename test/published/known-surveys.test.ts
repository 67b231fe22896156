/**
 * Published surveys, as a sanity check of the whole chain (cosmology, Schechter integral, magnitude
 * limit through the luminosity distance, colour term): a survey whose selection is a plain flux
 * limit, with a luminosity function measured from that survey, must land near the surface density
 * and median redshift the survey reported. These are not 1e-9 checks: the published numbers are
 * recalled FROM MEMORY, and the model (a non-evolving Schechter function with a power-law colour
 * term) is simpler than the surveys' own k-corrections and evolution, so the tolerances are wide
 * (stated beside each check) and a failure means something is grossly wrong, not slightly.
 *
 * The luminosity function (from memory): Blanton et al. 2003, ApJ 592, 819, the r band shifted to
 * z = 0.1: M* - 5 log10 h = -20.44, alpha = -1.05, phi* = 1.49e-2 h^3 Mpc^-3; with h = 0.7,
 * M* = -21.21 and phi* = 5.11e-3 Mpc^-3. The band shifted to z = 0.1 is centred at
 * 6165 / 1.1 = 5605 Angstrom in the rest frame (common practice), with a flat-ish colour term
 * (beta = -1, f_lambda proportional to lambda^-1: a red galaxy's optical slope, common practice).
 */
import { describe, expect, test } from 'vitest';
import { loadSurveyText, predict } from '../../src/index.js';
import { medianRedshift } from '../support/median-redshift.js';

function survey(limit: number, zmax: number): string {
  return `format: 1
title: a flux-limited r-band galaxy survey (published check)
cosmology: {h0: 70, omega_m: 0.3}
area: "1 deg^2"
redshift: {min: 0.005, max: ${zmax}}
detection:
  kind: magnitude
  limit: ${limit}
  band: "6165 Angstrom"
  beta: -1
population:
  name: galaxies
  variable: magnitude
  rest_wavelength: 5605
  phi_star: 5.11e-3
  m_star: -21.21
  alpha: -1.05
slices: {width: 0.01}
`;
}

describe('published flux-limited surveys (from memory; wide tolerances)', () => {
  test('SDSS main galaxy sample, r < 17.77: about 90 per deg^2 with median z about 0.10 (Strauss et al. 2002, AJ 124, 1810; from memory)', () => {
    const p = predict(loadSurveyText(survey(17.77, 0.4), 'sdss-like.yaml'), { noUncertainty: true });
    // 15 %: the target density is quoted as "about 90"; the colour term is a power law
    expect(p.totals.count).toBeGreaterThan(90 * 0.85);
    expect(p.totals.count).toBeLessThan(90 * 1.15);
    // median redshift 0.104 (from memory), within 0.02
    expect(Math.abs(medianRedshift(p) - 0.104)).toBeLessThan(0.02);
  });

  test('GAMA main survey, r < 19.8: about 1000 per deg^2 with median z about 0.2 (Driver et al. 2011, MNRAS 413, 971; Baldry et al. 2010; from memory)', () => {
    const p = predict(loadSurveyText(survey(19.8, 0.6), 'gama-like.yaml'), { noUncertainty: true });
    // 25 %: no luminosity evolution is modelled, and the density is recalled only roughly
    expect(p.totals.count).toBeGreaterThan(1000 * 0.75);
    expect(p.totals.count).toBeLessThan(1000 * 1.25);
    expect(Math.abs(medianRedshift(p) - 0.2)).toBeLessThan(0.04);
  });

  test('2dFGRS, b_J < 19.45: about 170 per deg^2 with median z about 0.11 (Colless et al. 2001, MNRAS 328, 1039; from memory)', () => {
    // The survey's own luminosity function (from memory): Norberg et al. 2002, MNRAS 336, 907,
    // b_J band, k+e corrected to z = 0: M* - 5 log10 h = -19.66, alpha = -1.21,
    // phi* = 1.61e-2 h^3 Mpc^-3; with h = 0.7, M* = -20.43 and phi* = 5.52e-3 Mpc^-3. The colour
    // term beta = +1 (f_nu proportional to nu^-3) gives K(z) = 5 log10(1 + z), 0.21 mag at z = 0.1,
    // close to the survey's mean k+e correction there (about 0.2 mag; from memory).
    const text = `format: 1
title: a flux-limited blue-band galaxy survey (published check)
cosmology: {h0: 70, omega_m: 0.3}
area: "1 deg^2"
redshift: {min: 0.005, max: 0.4}
detection: {kind: magnitude, limit: 19.45, band: "4600 Angstrom", beta: 1}
population: {name: galaxies, variable: magnitude, rest_wavelength: 4600, phi_star: 5.52e-3, m_star: -20.43, alpha: -1.21}
slices: {width: 0.01}
`;
    const p = predict(loadSurveyText(text, '2df-like.yaml'), { noUncertainty: true });
    // 20 %: about 245,000 redshifts over about 1,500 deg^2 at about 90 % completeness gives
    // 170-190 per deg^2 (from memory); the colour term is a power law
    expect(p.totals.count).toBeGreaterThan(170 * 0.8);
    expect(p.totals.count).toBeLessThan(190 * 1.2);
    expect(Math.abs(medianRedshift(p) - 0.11)).toBeLessThan(0.02);
  });

  test('a fainter limit, the same sky: the deeper survey finds more, at higher median redshift (common practice)', () => {
    const a = predict(loadSurveyText(survey(17.77, 0.6), 'a.yaml'), { noUncertainty: true });
    const b = predict(loadSurveyText(survey(19.8, 0.6), 'b.yaml'), { noUncertainty: true });
    // Euclidean counts would give 10^(0.6 * 2.03) = 16.5 times more; expansion and the
    // luminosity function's cut-off give fewer (common practice): between 5 and 16.5 times.
    const ratio = b.totals.count / a.totals.count;
    expect(ratio).toBeGreaterThan(5);
    expect(ratio).toBeLessThan(16.5);
    expect(medianRedshift(b)).toBeGreaterThan(medianRedshift(a));
  });
});
