/**
 * Published surveys of two more kinds, as sanity checks of the whole chain (test/published/
 * known-surveys.test.ts has the optical flux-limited ones): a slitless H-alpha line-flux survey
 * with an evolving luminosity function, and an all-sky near-infrared survey counted with two
 * populations and magnitudes given in Vega. The published numbers and the luminosity functions
 * are named beside each check, with where they come from; the tolerances are the model's honest
 * uncertainty (stated beside each), not the precision of the integral, so a failure means
 * something is grossly wrong, not slightly.
 */
import { describe, expect, test } from 'vitest';
import { loadSurveyText, predict } from '../../src/index.js';
import { medianRedshift } from '../support/median-redshift.js';

describe('published line-flux and near-infrared surveys (wide tolerances)', () => {
  test('Euclid-like slitless H-alpha, 0.9 < z < 1.8, with Pozzetti et al. 2016 Model 1: inside the densities the paper gives across its three models at 1 and 2e-16 erg/s/cm^2', () => {
    // Model 1 of Pozzetti et al. 2016, A&A 590, A3 (from memory, as a public implementation of
    // it also writes it): the observed (dust-attenuated, [NII]-free) H-alpha function,
    // alpha = -1.35, L*(z) = 10^41.5 (1 + z)^2 erg/s, phi*(z) = 10^-2.8 (1 + z) Mpc^-3 up to
    // z_break = 1.3 and 10^-2.8 (1 + z_break)^2 / (1 + z) beyond; h = 0.7, Omega_m = 0.3.
    const survey = (limit: string) => `format: 1
title: Euclid-like slitless H-alpha survey (published check)
cosmology: {h0: 70, omega_m: 0.3}
area: 1
redshift: {min: 0.9, max: 1.8}
detection: {kind: line_flux, limit: "${limit} erg/s/cm^2", line: "6562.8 Angstrom"}
population:
  variable: luminosity
  log10_phi_star: "-2.8 + log10(1 + min(z, 1.3)) + log10(2.3) - log10(1 + max(z, 1.3))"
  log10_l_star: "41.5 + 2*log10(1 + z)"
  alpha: -1.35
slices: {width: 0.1}
`;
    const at2 = predict(loadSurveyText(survey('2e-16'), 'pozzetti-2e-16.yaml'), { noUncertainty: true });
    const at1 = predict(loadSurveyText(survey('1e-16'), 'pozzetti-1e-16.yaml'), { noUncertainty: true });
    // The paper's abstract: 2,000-4,800 per deg^2 above 2e-16 and 7,700-13,300 above 1e-16 over
    // 0.9 < z < 1.8, the ranges across its three models (the spread of the luminosity function
    // is the tolerance). skytally gives 3,902 and 12,990 (an independent scipy integration of
    // the same model gives the same to 1e-12).
    expect(at2.totals.count).toBeGreaterThan(2000);
    expect(at2.totals.count).toBeLessThan(4800);
    expect(at1.totals.count).toBeGreaterThan(7700);
    expect(at1.totals.count).toBeLessThan(13300);
  });

  test('2MRS, K_s <= 11.75 (Vega, isophotal) over 91 % of the sky: 44,599 galaxies (Huchra et al. 2012, ApJS 199, 26), median z about 0.03, with the Kochanek et al. 2001 early- and late-type K-band functions', () => {
    // Kochanek et al. 2001, ApJ 560, 566 (abstract; the same 2MASS isophotal K20 magnitudes
    // 2MRS selects on): early types M* - 5 log10 h = -23.53, alpha = -0.92,
    // n* = 0.45e-2 h^3 Mpc^-3; late types -22.98, -0.87, 1.01e-2. With h = 0.7: M* = -24.30 and
    // -23.75, phi* = 1.544e-3 and 3.464e-3 Mpc^-3. The K-correction -6 log10(1 + z) mag of that
    // paper (from memory) is the power law beta = -3.4 at the band's own rest wavelength
    // (2.5 (beta + 1) log10(1 + z), survey-file.md). vega_to_ab 1.85 for K_s (from memory)
    // shifts the limit and M* alike.
    const pop = (name: string, phi: number, m: number, alpha: number) =>
      `  - {name: ${name}, variable: magnitude, system: vega, vega_to_ab: 1.85, rest_wavelength: "2.16 um", phi_star: ${phi}, m_star: ${m}, alpha: ${alpha}}`;
    const text = `format: 1
title: 2MRS-like all-sky K-band redshift survey (published check)
cosmology: {h0: 70, omega_m: 0.3}
area: ${0.91 * 41252.96}
redshift: {min: 0.0005, max: 0.2}
detection: {kind: magnitude, system: vega, vega_to_ab: 1.85, limit: 11.75, band: "2.16 um", beta: -3.4}
populations:
${pop('early types', 1.544e-3, -24.3, -0.92)}
${pop('late types', 3.464e-3, -23.75, -0.87)}
slices: {width: 0.01}
`;
    const p = predict(loadSurveyText(text, '2mrs-like.yaml'), { noUncertainty: true });
    expect(p.breakdown).toBe('redshift');
    // 25 %: n* is known to 13 % and M* to 0.06 mag (8 % in the count) per type, and the local
    // volume 2MRS fills is not a fair sample (Poisson and cosmic variance are small, the
    // luminosity function's own spread is not). skytally gives 47,114 (1.06 times).
    expect(p.totals.count).toBeGreaterThan(44599 * 0.75);
    expect(p.totals.count).toBeLessThan(44599 * 1.25);
    // median z about 0.03 (Bilicki et al. 2014, ApJS 210, 9, abstract), within 0.005; skytally 0.028
    expect(Math.abs(medianRedshift(p) - 0.03)).toBeLessThan(0.005);
    // both types contribute, the late ones a little more (their luminosity density is 1.17 times
    // the early ones', the abstract; the brighter early types reach further): each 40-60 %
    const early = p.populations.find((x) => x.name === 'early types')!.totals.count;
    expect(early / p.totals.count).toBeGreaterThan(0.4);
    expect(early / p.totals.count).toBeLessThan(0.6);
  });
});
