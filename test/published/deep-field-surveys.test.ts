/**
 * Published deep-field surveys of four more kinds, as checks of the whole chain: a z ~ 7 dropout
 * count in the Hubble Ultra Deep Field, z ~ 4 dropouts and the UV luminosity density, a K-band
 * count with an evolving luminosity function and magnitudes in Vega, and a stellar-mass-limited
 * count with tabulated double Schechter mass functions and a mass limit written as an expression.
 * The surveys' numbers and luminosity functions are recalled FROM MEMORY (named beside each check).
 * Each check has two parts:
 * - the integral against an independent scipy integration of the same model, to 1e-6
 *   (test/reference/generate/published_counts.py, scipy 1.17.1: comoving distance, dV/dz, the
 *   magnitude limit through D_L and the colour term, the incomplete gamma function by quad);
 * - the published number against the prediction, within the model's own spread (Poisson noise,
 *   cosmic variance and, where given, the function's `model_uncertainty`), or within a stated
 *   tolerance where the spread is the luminosity function's and the k-correction's.
 */
import { describe, expect, test } from 'vitest';
import { loadSurveyText, predict } from '../../src/index.js';
import { medianRedshift } from '../support/median-redshift.js';

const close = (got: number, want: number, rel: number) => expect(Math.abs(got / want - 1)).toBeLessThan(rel);

describe('published deep-field surveys (from memory; the model spread as tolerance)', () => {
  test('z ~ 7 Y-dropouts in the HUDF at UDF12 depth (J125 about 29.5 over about 4.5 arcmin^2): 47 at 6.5 < z < 7.5 (McLure et al. 2013, MNRAS 432, 2696; from memory), with the Bouwens et al. 2015 z ~ 7 function', () => {
    // Bouwens et al. 2015, ApJ 803, 34, z ~ 7 (from memory): M* = -20.87 +- 0.26,
    // phi* = 0.29e-3 Mpc^-3 (+0.21/-0.12: about 0.22 dex), alpha = -2.06 +- 0.13; the correlations
    // are assumed (phi* and M* 0.7, M* and alpha 0.5: a brighter knee with a lower normalisation
    // and a steeper slope). J125 sees rest 1470-1670 A over the window: no Lyman-alpha break.
    const text = `format: 1
title: UDF12-like z ~ 7 Y-dropouts (published check)
cosmology: {h0: 70, omega_m: 0.3}
area: "4.5 arcmin^2"
redshift: {min: 6.5, max: 7.5}
detection: {kind: magnitude, limit: 29.5, band: "1.25 um", beta: -2.0, igm: madau1995}
population:
  name: z ~ 7 galaxies
  variable: magnitude
  rest_wavelength: 1600
  phi_star: 0.29e-3
  m_star: -20.87
  alpha: -2.06
  model_uncertainty: {log10_phi_star: 0.22, m_star: 0.26, alpha: 0.13, correlation: {log10_phi_star-m_star: 0.7, m_star-alpha: 0.5}}
slices: {count: 2}
`;
    const p = predict(loadSurveyText(text, 'udf12-like.yaml'), { model: { draws: 1000, seed: 1 } });
    // scipy (published_counts.py): 65.85357023785062
    close(p.totals.count, 65.85357023785062, 1e-6);
    // 47 observed lies 29 % below the count; Poisson 12 %, cosmic variance 26 % (bias
    // auto, 4.7) and the function's own errors 57 %: within 2 sigma of the three in quadrature,
    // and inside the model's p16-p84 range (39-115). Steeper faint ends than -2.06 within its
    // error, or a count lower by more than 2 sigma, would fail.
    const u = p.totals.uncertainty!;
    const m = p.totals.model!;
    expect(Math.abs(47 - p.totals.count)).toBeLessThan(2 * Math.hypot(u.total_fraction, m.fraction) * p.totals.count);
    expect(47).toBeGreaterThan(m.p16);
    expect(47).toBeLessThan(m.p84);
    // a small deep field at z = 7: cosmic variance exceeds Poisson noise (Trenti & Stiavelli 2008,
    // ApJ 676, 767: 25-35 % for one WFC3 field at z ~ 7; from memory)
    expect(u.cosmic_variance_fraction).toBeGreaterThan(0.2);
    expect(u.cosmic_variance_fraction).toBeLessThan(0.4);
    expect(u.cosmic_variance_fraction).toBeGreaterThan(u.poisson_fraction);
  });

  test('z ~ 4 B-dropouts: the count of a GOODS-deep-like field, and the UV luminosity density above M = -17 at z ~ 3.8, log10 rho_UV = 26.52 +- 0.06 erg/s/Hz/Mpc^3 (Bouwens et al. 2015, ApJ 803, 34, Table 7; from memory)', () => {
    // The z ~ 4 function of the same paper (from memory): M* = -20.88, phi* = 1.97e-3, alpha = -1.64.
    const model = 'rest_wavelength: 1600, phi_star: 1.97e-3, m_star: -20.88, alpha: -1.64';
    const field = `format: 1
title: GOODS-deep-like z ~ 4 B-dropouts (published check)
cosmology: {h0: 70, omega_m: 0.3}
area: "65 arcmin^2"
redshift: {min: 3.5, max: 4.5}
detection: {kind: magnitude, limit: 27.7, band: "9000 Angstrom", beta: -1.9, igm: madau1995}
population: {name: z ~ 4 galaxies, variable: magnitude, ${model}}
slices: {count: 4}
`;
    const p = predict(loadSurveyText(field, 'goods-z4-like.yaml'), { noUncertainty: true });
    // scipy (published_counts.py): the count, and the first slice's luminosity density of the
    // detected and of all sources (volume-weighted over the slice)
    close(p.totals.count, 1721.9590197461296, 1e-6);
    close(p.slices![0]!.luminosity_density!.detected, 2.653049989521422e26, 1e-6);
    close(p.slices![0]!.luminosity_density!.total!, 4.7597152582902333e26, 1e-6);
    // The paper's luminosity density integrates its function to M_UV = -17.0: a threshold
    // survey at that absolute magnitude gives it (L* from M* through the AB zero point at 10 pc).
    const rho = `format: 1
title: z ~ 4 UV luminosity density above M = -17 (published check)
cosmology: {h0: 70, omega_m: 0.3}
area: 1
redshift: {min: 3.5, max: 4.5}
detection: {kind: threshold, limit: -17}
population: {name: z ~ 4 galaxies, variable: magnitude, ${model}}
slices: {count: 1}
`;
    const r = predict(loadSurveyText(rho, 'rho-uv-z4.yaml'), { noUncertainty: true });
    expect(r.totals.luminosity_density!.unit).toBe('erg s^-1 Hz^-1 Mpc^-3');
    // skytally 26.5176; the paper's error 0.06 dex is the tolerance
    expect(Math.abs(Math.log10(r.totals.luminosity_density!.detected) - 26.52)).toBeLessThan(0.06);
  });

  test('K20 survey, K_s <= 20 (Vega) over 52 arcmin^2: 545 objects, about 490 of them galaxies, median z about 0.8 (Cimatti et al. 2002, A&A 392, 395; from memory), with the Cirasuolo et al. 2010 evolving K-band function', () => {
    // Cirasuolo et al. 2010, MNRAS 401, 1166 (from memory): M*(z) = -22.26 - (z / 1.78)^0.47 (AB),
    // phi*(z) = 3.5e-3 exp(-(z / 1.70)^1.47) Mpc^-3, alpha = -1.07. K_s vega_to_ab 1.85 (from
    // memory). The colour term beta = -2 (flat in f_nu) takes rest-frame J - K = 0 in AB (about
    // 0.9 in Vega; from memory); beta -2.5 or -1.5 would move the count by +35 % or -26 % and the
    // median by +0.14 or -0.13: the k-correction, not the integral, sets the tolerances below.
    const text = `format: 1
title: K20-like K-band count (published check)
cosmology: {h0: 70, omega_m: 0.3}
area: "52 arcmin^2"
redshift: {min: 0.01, max: 4}
detection: {kind: magnitude, system: vega, vega_to_ab: 1.85, limit: 20, band: "2.16 um", beta: -2}
population:
  name: galaxies
  variable: magnitude
  rest_wavelength: "2.16 um"
  m_star: "-22.26 - (z/1.78)^0.47"
  phi_star: "3.5e-3*exp(-(z/1.70)^1.47)"
  alpha: -1.07
slices: {width: 0.1}
`;
    const p = predict(loadSurveyText(text, 'k20-like.yaml'));
    // scipy (published_counts.py): 457.1214738957092 in all, 34.729532167746136 at 0.71-0.81
    close(p.totals.count, 457.1214738957092, 1e-6);
    const s = p.slices!.find((x) => Math.abs(x.z_min - 0.71) < 1e-9)!;
    close(s.count, 34.729532167746136, 1e-6);
    // 25 %: Poisson 4.7 % and cosmic variance 7.7 % at bias auto, and the colour term above;
    // skytally gives 457 (0.93 times 490)
    expect(p.totals.count).toBeGreaterThan(490 * 0.75);
    expect(p.totals.count).toBeLessThan(490 * 1.25);
    // median z 0.80 within 0.1; skytally 0.87
    expect(Math.abs(medianRedshift(p) - 0.8)).toBeLessThan(0.1);
  });

  test('stellar-mass-limited count over COSMOS with the Davidzon et al. 2017 double Schechter mass functions: the stellar mass density, log10 rho* about 8.3 at z ~ 0.35 and 7.9 at z ~ 1.75 (Davidzon et al. 2017, A&A 605, A70; from memory)', () => {
    // Davidzon et al. 2017 total mass functions (from memory; Chabrier IMF, h = 0.7), the
    // standard phi* (their per-dM form), by bin centre: log M* 10.78, 10.77, 10.56, 10.62, 10.51;
    // phi1* (1e-3 Mpc^-3) 1.187, 1.070, 1.428, 1.069, 0.969 with alpha1 -1.38, -1.36, -1.31,
    // -1.28, -1.28; phi2* 1.92, 1.68, 2.19, 1.21, 0.64 with alpha2 -0.43, 0.03, 0.51, 0.29, 0.82.
    // Their mass completeness -3.23e7 (1 + z) + 7.83e7 (1 + z)^2 Msun (from memory).
    const zs = [0.35, 0.65, 0.95, 1.3, 1.75];
    const tab = (v: number[]) => `{table: [${zs.map((z, i) => `[${z}, ${v[i]}]`).join(', ')}]}`;
    const text = `format: 1
title: COSMOS-like mass-limited count (published check)
cosmology: {h0: 70, omega_m: 0.3}
area: 1.5
redshift: {min: 0.2, max: 2.0}
detection: {kind: threshold, limit: "log10(-3.23e7*(1 + z) + 7.83e7*(1 + z)^2)"}
population:
  name: galaxies
  shape: double_schechter
  variable: luminosity
  quantity: stellar mass [Msun]
  log10_l_star: ${tab([10.78, 10.77, 10.56, 10.62, 10.51])}
  phi_star_1: ${tab([1.187e-3, 1.07e-3, 1.428e-3, 1.069e-3, 0.969e-3])}
  alpha_1: ${tab([-1.38, -1.36, -1.31, -1.28, -1.28])}
  phi_star_2: ${tab([1.92e-3, 1.68e-3, 2.19e-3, 1.21e-3, 0.64e-3])}
  alpha_2: ${tab([-0.43, 0.03, 0.51, 0.29, 0.82])}
slices: {edges: [0.2, 0.5, 0.8, 1.1, 1.5, 2.0]}
`;
    const p = predict(loadSurveyText(text, 'cosmos-mass-like.yaml'), { noUncertainty: true });
    // scipy (published_counts.py; the tables' rows are kinks, integrated piece by piece)
    close(p.totals.count, 274154.61904732505, 1e-6);
    close(p.slices![0]!.count, 30289.537429884924, 1e-6);
    const rho = p.slices!.map((x) => x.luminosity_density!.total!);
    close(rho[0]!, 202215574.99235505, 1e-6);
    close(rho[2]!, 168929119.1889345, 1e-6);
    close(rho[4]!, 80238295.73599774, 1e-6);
    // the mass limit, 1e8 Msun at z = 0.35, leaves out under 2 % of the mass
    expect(p.slices![0]!.luminosity_density!.fraction!).toBeGreaterThan(0.98);
    // the published densities within 0.15 dex (recalled to about 0.1); skytally 8.31 and 7.90
    expect(Math.abs(Math.log10(rho[0]!) - 8.3)).toBeLessThan(0.15);
    expect(Math.abs(Math.log10(rho[4]!) - 7.9)).toBeLessThan(0.15);
  });
});
