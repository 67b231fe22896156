/**
 * The comoving distance at very small redshifts, where the line-of-sight integral in
 * u = 1 / sqrt(1 + z) loses digits (its rounding is about 1e-16 / z of the distance, and it is 0
 * below z = 1e-16): below z = 1e-5 it is the Taylor series of D_H int_0^z dz' / E(z') (Hogg 1999,
 * eqs. 14-15). Reference: mpmath's quadrature of the same integral at 40 digits
 * (test/reference/generate/small_z_distances.py). A window from z = 0 reaches such redshifts in the
 * counts' quadrature (before, alpha = -2.45 from z = 0 counted its first slice 4.4 % low; now 0.12 %,
 * test/counts/steep-faint-end.test.ts).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import { FlatCosmology } from '../../src/cosmology/flat-cosmology.js';

const REF = JSON.parse(readFileSync('test/reference/small_z_distances.json', 'utf8')) as Record<
  string,
  { z: number; comoving_mpc: number; lookback_over_hubble_time: number }[]
>;

const rel = (a: number, b: number) => Math.abs(a / b - 1);

/** The reference's two cosmologies: h0 = 70, Om = 0.3, without radiation and with Or = 1e-4. */
const CASES = [
  ['h0_70_om_0.3', 0],
  ['h0_70_om_0.3_or_1e-4', 1e-4],
] as const;
const cosmologyWith = (omegaR: number) =>
  new FlatCosmology({ h0: 70, omegaM: 0.3, omegaR, omegaLambda: 1 - 0.3 - omegaR, tCmb: omegaR > 0 ? 2.7 : 0 });

/** Crossing z = 1e-5, where the series hands over to the integral: f grows, and the two sides agree to the integral's accuracy (its rounding there, about 1e-11). */
function expectSmoothAtSwitch(f: (z: number) => number): void {
  const below = f(1e-5 * (1 - 1e-9));
  const above = f(1e-5 * (1 + 1e-9));
  expect(above).toBeGreaterThan(below);
  expect(rel(above / below, (1 + 1e-9) / (1 - 1e-9))).toBeLessThan(1e-10);
}

describe('comoving distance below z = 1e-5 (mpmath, 40 digits)', () => {
  test.each(CASES)('%s: every redshift to 1e-15', (name, omegaR) => {
    const c = cosmologyWith(omegaR);
    for (const { z, comoving_mpc } of REF[name]!)
      expect(rel(c.comovingDistanceMpc(z), comoving_mpc)).toBeLessThan(1e-15);
  });

  test('the distance grows with z through the switch at 1e-5, and D_L, D_A and dV/dz follow from it', () => {
    const c = FlatCosmology.fromParams({ h0: 70, omegaM: 0.3 });
    expectSmoothAtSwitch((z) => c.comovingDistanceMpc(z));
    // Hogg 1999 eqs. 16, 18, 28 (flat): D_L = (1 + z) D_C, D_A = D_C / (1 + z), dV/dz = D_H D_C^2 / E
    const z = 1e-12;
    const dc = c.comovingDistanceMpc(z);
    expect(dc).toBeGreaterThan(0);
    expect(c.luminosityDistanceMpc(z)).toBe((1 + z) * dc);
    expect(rel(c.volumeElementMpc3Sr(z), (c.hubbleDistanceMpc * dc * dc) / c.hubbleRatio(z))).toBeLessThan(1e-15);
  });
});

describe('lookback time below z = 1e-5 (mpmath, 40 digits)', () => {
  // failed before: below z = 1e-8 it was the distance's series in Mpc (307 times t_L for h0 = 70),
  // and the integral above lost digits as D_C's did (its rounding about 1e-16 / z)
  test.each(CASES)('%s: t_L / t_H at every redshift to 1e-15', (name, omegaR) => {
    const c = cosmologyWith(omegaR);
    for (const { z, lookback_over_hubble_time } of REF[name]!)
      expect(rel(c.lookbackTimeGyr(z) / c.hubbleTimeGyr, lookback_over_hubble_time), `z = ${z}`).toBeLessThan(1e-15);
  });

  test('the lookback time grows with z through the switch at 1e-5 (the property test of flat-lcdm.test.ts found h0 = 30, Om = 0.01: t_L(3.3e-9) = t_L(1e-6))', () => {
    const c = FlatCosmology.fromParams({ h0: 30, omegaM: 0.01, tCmb: 0 });
    expect(c.lookbackTimeGyr(3.272234713366311e-9 + 1e-6)).toBeGreaterThan(c.lookbackTimeGyr(3.272234713366311e-9));
    expectSmoothAtSwitch((z) => c.lookbackTimeGyr(z));
  });
});
