/**
 * The magnitude kind's K(z) (docs/survey-file.md) against a computation through fluxes with the AB
 * zero point of Oke & Gunn 1983 (m_AB = -2.5 log10 f_nu[erg s^-1 cm^-2 Hz^-1] - 48.60), and the
 * line_flux limit L_lim = 4 pi D_L^2 F (docs/survey-file.md) recomputed by hand. Tolerance 1e-10 mag / relative.
 */
import { describe, expect, test } from 'vitest';
import { FlatCosmology } from '../../src/cosmology/flat-cosmology.js';
import { resolveCosmology } from '../../src/cosmology/parameters.js';
import { apparentMinusAbsolute, makeObserver } from '../../src/selection/observe.js';
import { transmission, filterRedshiftWindow } from '../../src/selection/filter.js';
import { MPC_CM, PC_CM, SPEED_OF_LIGHT_M_S } from '../../src/cosmology/constants.js';
import type { Population } from '../../src/model/population.js';

const cosmo = new FlatCosmology(resolveCosmology({ h0: 70, omegaM: 0.3 }));

/** Apparent AB magnitude through fluxes: a source of absolute AB magnitude M at rest wavelength
 * lamRest, spectrum f_lambda ~ lambda^beta (so L_nu ~ nu^(-beta-2)), observed in a band at lamBand. */
function apparentThroughFluxes(M: number, z: number, lamBand: number, lamRest: number, beta: number): number {
  // Oke & Gunn 1983: f_nu at 10 pc of an absolute magnitude M
  const fnu10 = 10 ** (-0.4 * (M + 48.6)); // erg s^-1 cm^-2 Hz^-1
  const lnuRest = 4 * Math.PI * (10 * PC_CM) ** 2 * fnu10; // erg s^-1 Hz^-1 at nu_rest = c / lamRest
  const c = SPEED_OF_LIGHT_M_S * 1e10; // Angstrom / s
  const nuRest = c / lamRest;
  const nuEmit = (c / lamBand) * (1 + z); // the rest-frame frequency seen in the band
  const lnuEmit = lnuRest * (nuEmit / nuRest) ** (-beta - 2);
  const dl = cosmo.luminosityDistanceMpc(z) * MPC_CM;
  const fnuObs = ((1 + z) * lnuEmit) / (4 * Math.PI * dl * dl); // Hogg 1999 (K-correction definition)
  return -2.5 * Math.log10(fnuObs) - 48.6;
}

describe('magnitude kind: apparent minus absolute (AB zero point, Oke & Gunn 1983)', () => {
  test.each([
    [0.1, 6200, 6200, -2],
    [1.0, 8000, 1500, -2],
    [3.0, 9000, 1500, -2.3],
    [6.5, 15000, 1500, -1.7],
    [2.0, 20000, 5000, 0.5],
  ])('z = %f, band %f A, rest %f A, beta %f', (z, band, rest, beta) => {
    const M = -20.5;
    const expected = apparentThroughFluxes(M, z, band, rest, beta);
    expect(M + apparentMinusAbsolute(cosmo, z, band, rest, beta)).toBeCloseTo(expected, 10);
  });
});

describe('a radio spectrum f_nu ~ nu^a is beta = -(2 + a) (docs/survey-file.md, "Flux densities and frequencies")', () => {
  // common practice (radio K-correction): S_nu = (1 + z)^(1 + a) L_nu / (4 pi D_L^2), with L_nu the
  // rest-frame luminosity density at the observed frequency; here in SI and Jy, AB through 3631 Jy.
  test.each([
    [0.1, -0.7],
    [1.0, -0.7],
    [3.0, -0.7],
    [2.0, -0.8],
    [0.5, 0],
  ])('z = %f, a = %f, 1.4 GHz observed and rest', (z, a) => {
    const band = (SPEED_OF_LIGHT_M_S / 1.4e9) * 1e10; // Angstrom
    const lnu = 1e23; // W Hz^-1 at 1.4 GHz
    const ab = (wPerM2Hz: number) => -2.5 * Math.log10(wPerM2Hz / 1e-26 / 3631);
    const M = ab(lnu / (4 * Math.PI * (10 * PC_CM * 1e-2) ** 2));
    const dl = cosmo.luminosityDistanceMpc(z) * MPC_CM * 1e-2; // m
    const expected = ab(((1 + z) ** (1 + a) * lnu) / (4 * Math.PI * dl * dl));
    expect(M + apparentMinusAbsolute(cosmo, z, band, band, -(2 + a))).toBeCloseTo(expected, 10);
  });
});

describe('line_flux kind: limit in luminosity = 4 pi D_L^2 F / T (docs/survey-file.md)', () => {
  const pop = { lineAngstrom: 6563 } as unknown as Population;
  test('no filter', () => {
    const obs = makeObserver({ kind: 'line_flux', limitCgs: 5e-17 }, pop, cosmo).at(0.8, 1e42);
    const dl = cosmo.luminosityDistanceMpc(0.8) * MPC_CM;
    expect(obs.limitInVariable).toBeCloseTo(Math.log10(4 * Math.PI * dl * dl * 5e-17), 12);
    expect(obs.log10ULimit).toBeCloseTo(Math.log10((4 * Math.PI * dl * dl * 5e-17) / 1e42), 12);
  });
  test('gaussian filter: FWHM convention and 1.5 FWHM cut (common practice; docs/survey-file.md)', () => {
    const f = { centerAngstrom: 10000, fwhmAngstrom: 100, profile: 'gaussian' as const };
    expect(transmission(f, 10000)).toBe(1);
    expect(transmission(f, 10050)).toBeCloseTo(0.5, 12); // half maximum at center + FWHM/2
    expect(transmission(f, 10000 + 150.0001)).toBe(0);
    const w = filterRedshiftWindow(f, 6563);
    expect(w.min).toBeCloseTo(9850 / 6563 - 1, 12);
    expect(w.max).toBeCloseTo(10150 / 6563 - 1, 12);
    const obs = makeObserver({ kind: 'line_flux', limitCgs: 5e-17, filter: f }, pop, cosmo).at(10050 / 6563 - 1, 1e42);
    const dl = cosmo.luminosityDistanceMpc(10050 / 6563 - 1) * MPC_CM;
    expect(obs.limitInVariable).toBeCloseTo(Math.log10((4 * Math.PI * dl * dl * 5e-17) / 0.5), 10);
  });
});
