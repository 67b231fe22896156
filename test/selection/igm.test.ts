/**
 * Madau 1995 (ApJ 441, 18) mean intergalactic transmission.
 *
 * Check values: test/reference/igm.json, computed by test/reference/generate/igm.py (mpmath 1.2.1,
 * 30 digits) from the published formulas, written independently of src/selection/igm.ts: the
 * Lyman alpha-delta blanketing coefficients (Madau 1995 eqs. 12 and 15; equation numbers from
 * memory) and the photoelectric approximation of the paper's footnote 3 (from memory). Tolerances:
 * 1e-12 relative for point values; 1e-8 relative for averages over a tabulated top-hat band
 * (two-point Gauss-Legendre on 5 Angstrom steps against mpmath.quad; 1.5e-9 seen).
 * One value by hand (closed form, below) guards the fixture itself.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import {
  bandAveragedMadau1995,
  madau1995ContinuumDepth,
  madau1995LineDepth,
  madau1995Transmission,
} from '../../src/selection/igm.js';
import { makeObserver } from '../../src/selection/observe.js';
import { FlatCosmology } from '../../src/cosmology/flat-cosmology.js';
import { loadSurveyText } from '../../src/survey/load.js';
import { predict } from '../../src/counts/predict.js';

interface Point {
  lambda_obs: number;
  z: number;
  tau_lines: number;
  tau_photoelectric: number;
  transmission: number;
}
interface Band {
  band: [number, number];
  z: number;
  beta: number;
  transmission: number;
}
const fx = JSON.parse(readFileSync(new URL('../reference/igm.json', import.meta.url), 'utf8')) as {
  points: Point[];
  band_averages: Band[];
};

const rel = (a: number, b: number) => (b === 0 ? Math.abs(a) : Math.abs(a / b - 1));

describe('Madau 1995 transmission at points (igm.json, 1e-12 relative)', () => {
  test.each(fx.points.map((p) => [p.lambda_obs, p.z, p] as const))('lambda_obs = %f A, z = %f', (lam, z, p) => {
    expect(rel(madau1995LineDepth(lam, z), p.tau_lines)).toBeLessThan(1e-12);
    expect(rel(madau1995ContinuumDepth(lam, z), p.tau_photoelectric)).toBeLessThan(1e-12);
    expect(rel(madau1995Transmission(lam, z), p.transmission)).toBeLessThan(1e-12);
  });

  test('by hand: lambda_obs = 5000 A, z = 4 sees Lyman alpha and beta only (5000 < 1026 x 5, > 973 x 5)', () => {
    // Madau 1995 eqs. 12 and 15 (coefficients 3.6e-3 and 1.7e-3, exponent 3.46), closed form.
    const tau = 3.6e-3 * (5000 / 1216) ** 3.46 + 1.7e-3 * (5000 / 1026) ** 3.46;
    expect(rel(madau1995Transmission(5000, 4), Math.exp(-tau))).toBeLessThan(1e-14);
    expect(madau1995ContinuumDepth(5000, 4)).toBe(0); // 5000 > 912 x 5
  });

  test('no attenuation redward of Lyman alpha at the source (exact)', () => {
    for (const z of [0.5, 3, 7]) expect(madau1995Transmission(1216 * (1 + z) * 1.0001, z)).toBe(1);
  });
});

describe('band-averaged transmission over a tabulated top-hat band (igm.json, 1e-8 relative)', () => {
  test.each(fx.band_averages.map((b) => [b.z, b.beta, b] as const))('z = %f, beta = %f', (z, beta, b) => {
    const table = { file: 'tophat.csv', wavelengthAngstrom: [b.band[0], b.band[1]], transmission: [1, 1] };
    expect(rel(bandAveragedMadau1995(table, z, beta), b.transmission)).toBeLessThan(1e-8);
  });
});

const HIGHZ = `
cosmology: {h0: 70, omega_m: 0.3}
area: 0.1
redshift: {min: 5.0, max: 7.0}
detection: {kind: magnitude, limit: 27.5, band: 8500, igm: madau1995}
population: {variable: magnitude, phi_star: 5e-4, m_star: -20.8, alpha: -1.8}
slices: {count: 4}
`;

describe('IGM in the magnitude observer and predict', () => {
  test('apparent magnitudes grow by -2.5 log10 T at the band (closed form, 1e-12 mag)', () => {
    const s = loadSurveyText(HIGHZ, 'igm.yaml');
    const s0 = loadSurveyText(HIGHZ.replace(', igm: madau1995', ''), 'igm.yaml');
    const cosmo = new FlatCosmology(s.cosmology);
    const o = makeObserver(s.detection, s.populations[0]!, cosmo);
    const o0 = makeObserver(s0.detection, s0.populations[0]!, cosmo);
    for (const z of [5.2, 6.0, 6.8]) {
      expect(o.at(z, -20.8).a - o0.at(z, -20.8).a).toBeCloseTo(-2.5 * Math.log10(madau1995Transmission(8500, z)), 12);
    }
  });

  test('attenuation lowers the counts, and a band blueward of Lyman alpha warns (8500/1216 - 1 = 5.99)', () => {
    const p = predict(loadSurveyText(HIGHZ, 'igm.yaml'));
    const p0 = predict(loadSurveyText(HIGHZ.replace(', igm: madau1995', ''), 'igm.yaml'));
    expect(p.totals.count).toBeLessThan(p0.totals.count);
    // z = 5-5.5: the band (8500 A) is redward of Lyman alpha (1216 x 6.5 = 7904 A): no change.
    expect(p.slices![0]!.count).toBe(p0.slices![0]!.count);
    expect(p.slices![3]!.count).toBeLessThan(0.5 * p0.slices![3]!.count);
    expect(p.warnings).toHaveLength(1);
    expect(p.warnings[0]!.code).toBe('band_blueward_of_lyman_alpha');
    expect(p.warnings[0]!.message).toMatch(/z > 5\.99/);
    expect(p.warnings[0]!.message).toMatch(/Madau 1995/);
    expect(p0.warnings[0]!.code).toBe('band_blueward_of_lyman_alpha');
    expect(p0.warnings[0]!.message).toMatch(/no intergalactic attenuation/);
    const lowz = predict(loadSurveyText(HIGHZ.replace('{min: 5.0, max: 7.0}', '{min: 3.0, max: 5.5}'), 'igm.yaml'));
    // (its window starts at z = 3, where the band sees 2125 A at rest, far from the default 1500 A)
    expect(lowz.warnings.map((w) => w.code)).toEqual(['rest_wavelength_default_far_from_band']);
  });
});
