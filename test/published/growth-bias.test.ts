/**
 * The bias of DESI's emission-line galaxies as the DESI Final Design Report writes it (DESI
 * Collaboration 2016, arXiv:1611.00036, part I; from memory): b(z) D(z) = 0.84, D the linear growth
 * factor normalised to D(0) = 1, so b = 0.84 / D(z), about 1.2 at z = 0.7, 1.4 at z = 1.0 and 1.6
 * to 1.7 at z = 1.4 (from memory). The survey is invented, DESI-like: 14,000 deg^2 of [OII]
 * emitters over 0.6 < z < 1.6 (its luminosity function a stand-in: the bias enters no count). Each
 * slice's bias is checked against scipy's hypergeometric closed form of D
 * (test/reference/growth_bias.json, test/reference/generate/growth_bias.py, scipy 1.17.1) to 1e-9,
 * and against the rough published values to 0.1.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import { loadSurveyText, predict } from '../../src/index.js';

const reference = JSON.parse(readFileSync(new URL('../reference/growth_bias.json', import.meta.url), 'utf8')) as {
  cosmologies: { name: string; points: { z: number; bias: number }[] }[];
};
const planck = reference.cosmologies.find((c) => c.name === 'planck2018')!.points;

const DESI_LIKE = `format: 1
title: DESI-like emission-line galaxies (published check of bias over growth)
cosmology: {preset: planck2018}
area: "14000 deg^2"
redshift: {min: 0.6, max: 1.6}
detection: {kind: line_flux, limit: "8e-17 erg/s/cm^2", line: "3727 Angstrom"}
population:
  name: ELGs
  variable: luminosity
  log10_phi_star: -2.4
  log10_l_star: 41.8
  alpha: -1.3
  bias: {over_growth: 0.84}
slices: {edges: [0.6, 0.8, 0.9, 1.1, 1.3, 1.5, 1.6]}
`;

describe('DESI Final Design Report (DESI Collaboration 2016, arXiv:1611.00036): ELG bias 0.84 / D(z) (from memory)', () => {
  const p = predict(loadSurveyText(DESI_LIKE, 'desi-like-elg.yaml'));
  const biasAt = (z: number): number => {
    const s = p.slices!.find((x) => Math.abs(0.5 * (x.z_min + x.z_max) - z) < 1e-12)!;
    return s.uncertainty!.bias;
  };
  test.each([
    // [slice middle, the rough published value (from memory)]; measured (planck2018): 1.204, 1.382, 1.628
    [0.7, 1.2],
    [1.0, 1.4],
    [1.4, 1.65],
  ])('slice at z = %s: bias 0.84 / D(z) (scipy hyp2f1 to 1e-9), near %s (0.1)', (z, rough) => {
    const want = planck.find((q) => Math.abs(q.z - z) < 1e-12)!.bias;
    expect(Math.abs(biasAt(z) / want - 1)).toBeLessThan(1e-9);
    expect(Math.abs(biasAt(z) - rough)).toBeLessThan(0.1);
  });

  test('every slice: the bias rises with z as 1 / D, and the assumed model says the form', () => {
    const b = p.slices!.map((s) => s.uncertainty!.bias);
    for (let i = 1; i < b.length; i++) expect(b[i]!).toBeGreaterThan(b[i - 1]!);
    expect(p.models[0]!.summary).toContain('bias 0.84 / D(z)');
  });
});
