/**
 * Radio surveys as sanity checks of the whole chain: a blind HI 21-cm survey with its limit in
 * Jy km/s (docs/survey-file.md, "Radio lines: HI 21 cm"). The published numbers and functions are named
 * beside each check, with where they come from; the tolerances are the model's honest uncertainty,
 * stated beside each. Independent integrals: test/reference/generate/radio_line_counts.py (scipy).
 */
import { describe, expect, test } from 'vitest';
import { loadSurveyText, predict } from '../../src/index.js';

const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

describe('published radio surveys (wide tolerances)', () => {
  test('ALFALFA, 0.7 Jy km/s over 7,000 deg^2 to cz = 18,000 km/s: about 31,500 sources (Haynes et al. 2018), inside the spread of the Jones et al. 2018 HI mass function', () => {
    // Jones et al. 2018, MNRAS 477, 2 (ALFALFA 100 % sample, h = 0.7; from memory):
    // phi* = (4.5 +- 0.2 +- 0.8)e-3 Mpc^-3 dex^-1 in Phi(M) = ln 10 phi* (M/M*)^(alpha+1) e^(-M/M*)
    // (the standard phi*), log10 M* = 9.94 +- 0.01 +- 0.05, alpha = -1.25 +- 0.02 +- 0.1
    // (statistical, systematic). model_uncertainty below is the two in quadrature: 0.08 dex in
    // phi*, 0.05 in M*, 0.1 in alpha. L = 2.406e25 erg/s per Msun (M_HI = 2.356e5 D^2 S, the
    // docs). The limit: about 0.7 Jy km/s for lines 200 km/s wide (Haynes et al. 2011, from memory).
    const text = `format: 1
title: ALFALFA-like blind HI survey (published check)
cosmology: {h0: 70, omega_m: 0.3}
area: "7000 deg^2"
redshift: {min: 0, max: 0.06}
detection: {kind: line_flux, limit: "0.7 Jy km/s", line: "1420.405751768 MHz"}
population:
  variable: luminosity
  phi_star: 4.5e-3
  log10_l_star: "9.94 + log10(2.406176e25)"
  alpha: -1.25
  model_uncertainty: {log10_phi_star: 0.08, log10_l_star: 0.05, alpha: 0.1}
slices: {count: 6}
`;
    const p = predict(loadSurveyText(text, 'alfalfa-like.yaml'), { model: { draws: 1000, seed: 1 } });
    // scipy (radio_line_counts.py): 26008.571821957434, to 1e-7
    expect(rel(p.totals.count, 26008.571821957434)).toBeLessThan(1e-7);
    // The catalogue's about 31,500 (Haynes et al. 2018, ApJ 861, 49, abstract; from memory) is 1.21
    // times the count: a limit constant in S misses the narrow lines found below 0.7 Jy km/s (the
    // limit rises about as W^(1/2) with the width W). The check: inside the model's p16-p84 range
    // (20,700 to 33,100 here), and within a factor 1.5 of the count.
    const m = p.totals.model!;
    expect(31500).toBeGreaterThan(m.p16);
    expect(31500).toBeLessThan(m.p84);
    expect(p.totals.count).toBeGreaterThan(31500 / 1.5);
    expect(p.totals.count).toBeLessThan(31500 * 1.5);
    // most detections lie near the middle of the window (ALFALFA's cz distribution peaks near
    // 8,000 to 10,000 km/s, z about 0.03; from memory): the median within 0.02 to 0.04
    if (p.breakdown !== 'redshift') throw new Error('expected redshift slices');
    let cumulative = 0;
    const half = p.totals.count / 2;
    const median = p.slices.find((s) => (cumulative += s.count) >= half)!;
    expect(median.z_min).toBeGreaterThanOrEqual(0.02);
    expect(median.z_max).toBeLessThanOrEqual(0.04);
  });
});
