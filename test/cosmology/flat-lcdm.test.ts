/**
 * Flat Lambda-CDM distances, volumes and times.
 * Grouped by where the expected value comes from:
 *  1. astropy 5.2.1 FlatLambdaCDM(H0, Om0, Tcmb0, Neff=3.046, m_nu=0) and mpmath 1.2.1 quadrature
 *     (fixture test/reference/distances.json from test/reference/generate/distances.py);
 *     tolerance relative 1e-10 (worst seen about 2e-12).
 *  2. closed forms (Hogg 1999, astro-ph/9905116): Einstein-de Sitter and de Sitter.
 *  3. consistency between functions (volume integral, D_L = (1+z)^2 D_A, additivity).
 *  4. properties (fast-check) and input validation.
 */
import { readFileSync } from 'node:fs';
import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { FlatCosmology, carlsonRF } from '../../src/cosmology/flat-cosmology.js';
import { integrate } from '../../src/numerics/quadrature.js';

interface Row {
  z: number;
  comoving_distance_mpc: number;
  luminosity_distance_mpc: number;
  angular_diameter_distance_mpc: number;
  distance_modulus: number;
  differential_comoving_volume_mpc3_sr: number;
  comoving_volume_gpc3: number;
  lookback_time_gyr: number;
  age_gyr: number;
  mpmath_comoving_distance_mpc: number;
  mpmath_lookback_time_gyr: number;
  mpmath_age_gyr: number;
}
interface FixtureCosmology {
  label: string;
  h0: number;
  omega_m: number;
  t_cmb: number;
  astropy: { Ogamma0: number; Onu0: number; Ode0: number; hubble_distance_mpc: number; hubble_time_gyr: number };
  rows: Row[];
}
const fixture = JSON.parse(readFileSync(new URL('../reference/distances.json', import.meta.url), 'utf8')) as {
  header: { libraries: { astropy: string } };
  cosmologies: FixtureCosmology[];
};
const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);
const TOL = 1e-10;

type Getter = (c: FlatCosmology, z: number) => number;
const QUANTITIES: [keyof Row, Getter][] = [
  ['comoving_distance_mpc', (c, z) => c.comovingDistanceMpc(z)],
  ['luminosity_distance_mpc', (c, z) => c.luminosityDistanceMpc(z)],
  ['angular_diameter_distance_mpc', (c, z) => c.angularDiameterDistanceMpc(z)],
  ['distance_modulus', (c, z) => c.distanceModulus(z)],
  ['differential_comoving_volume_mpc3_sr', (c, z) => c.volumeElementMpc3Sr(z)],
  ['comoving_volume_gpc3', (c, z) => c.comovingVolumeMpc3(z) / 1e9],
  ['lookback_time_gyr', (c, z) => c.lookbackTimeGyr(z)],
  ['age_gyr', (c, z) => c.ageGyr(z)],
  ['mpmath_comoving_distance_mpc', (c, z) => c.comovingDistanceMpc(z)],
  ['mpmath_lookback_time_gyr', (c, z) => c.lookbackTimeGyr(z)],
  ['mpmath_age_gyr', (c, z) => c.ageGyr(z)],
];

describe('against astropy 5.2.1 and mpmath 1.2.1 (relative 1e-10, z = 0.001 to 20)', () => {
  test('fixture made with astropy 5.2.1', () => {
    expect(fixture.header.libraries.astropy).toBe('5.2.1');
  });
  describe.each(fixture.cosmologies)('$label', (fc_) => {
    const c = FlatCosmology.fromParams({ h0: fc_.h0, omegaM: fc_.omega_m, tCmb: fc_.t_cmb });
    test('Hubble distance, Hubble time, omega_r and omega_lambda match astropy (relative 1e-12)', () => {
      expect(rel(c.hubbleDistanceMpc, fc_.astropy.hubble_distance_mpc)).toBeLessThan(1e-12);
      expect(rel(c.hubbleTimeGyr, fc_.astropy.hubble_time_gyr)).toBeLessThan(1e-12);
      const orAstropy = fc_.astropy.Ogamma0 + fc_.astropy.Onu0;
      if (orAstropy === 0) expect(c.omegaR).toBe(0);
      else expect(rel(c.omegaR, orAstropy)).toBeLessThan(1e-9);
      expect(Math.abs(c.omegaLambda - fc_.astropy.Ode0)).toBeLessThan(1e-12);
    });
    test.each(QUANTITIES.map(([key, get]) => ({ key, get })))('$key', ({ key, get }) => {
      let worst = 0;
      for (const r of fc_.rows) worst = Math.max(worst, rel(get(c, r.z), r[key]));
      expect(worst, `worst relative error ${worst.toExponential(2)}`).toBeLessThan(TOL);
    });
  });
});

describe('closed forms (Hogg 1999)', () => {
  const zs = [0.001, 0.01, 0.1, 0.5, 1, 2, 5, 10, 20];
  test('Einstein-de Sitter (Om = 1, no radiation): D_C = 2 D_H (1 - 1/sqrt(1+z)), relative 1e-14', () => {
    const c = FlatCosmology.fromParams({ h0: 70, omegaM: 1 });
    for (const z of zs) {
      expect(rel(c.comovingDistanceMpc(z), 2 * c.hubbleDistanceMpc * (1 - 1 / Math.sqrt(1 + z)))).toBeLessThan(1e-13);
    }
  });
  test('the elliptic-integral path approaches Einstein-de Sitter as Om -> 1 (Om = 1 - 1e-9), relative 1e-8', () => {
    const c = FlatCosmology.fromParams({ h0: 70, omegaM: 1 - 1e-9 });
    for (const z of zs) {
      expect(rel(c.comovingDistanceMpc(z), 2 * c.hubbleDistanceMpc * (1 - 1 / Math.sqrt(1 + z)))).toBeLessThan(1e-8);
      expect(rel(c.ageGyr(z), (2 / 3) * c.hubbleTimeGyr * Math.pow(1 + z, -1.5))).toBeLessThan(1e-8);
    }
  });
  test('de Sitter limit (tiny Om = 1e-12, since Om must be > 0): D_C = D_H z and t_L = t_H ln(1+z), relative 2e-9', () => {
    // The Om = 1e-12 matter term changes D_C by a relative Om((1+z)^4 - 1)/(8z) <= 1.3e-9 at z <= 20
    // and t_L by less than 1.1e-9; the tolerance 2e-9 covers that.
    // below the factory's omega_m range (0.01): the class itself, as the factory would build it
    const c = new FlatCosmology({ h0: 70, omegaM: 1e-12, omegaR: 0, omegaLambda: 1 - 1e-12, tCmb: 0 });
    for (const z of zs) {
      expect(rel(c.comovingDistanceMpc(z), c.hubbleDistanceMpc * z), `z=${z}`).toBeLessThan(2e-9);
      expect(rel(c.lookbackTimeGyr(z), c.hubbleTimeGyr * Math.log1p(z)), `z=${z}`).toBeLessThan(2e-9);
    }
  });
  test('Carlson R_F: R_F(0, 1, 2) = 1.3110287771461 (Carlson 1995 test value, from memory), R_F(x, x, x) = 1/sqrt(x)', () => {
    expect(Math.abs(carlsonRF(0, 1, 2) - 1.3110287771461)).toBeLessThan(1e-12);
    expect(rel(carlsonRF(4, 4, 4), 0.5)).toBeLessThan(1e-15);
    // R_F(0, 1 - k^2, 1) = K(k); K(0) = pi/2 (DLMF 19.2.8)
    expect(rel(carlsonRF(0, 1, 1), Math.PI / 2)).toBeLessThan(1e-15);
  });
});

describe('consistency between functions', () => {
  const models = [
    FlatCosmology.fromParams({ h0: 70, omegaM: 0.3 }),
    FlatCosmology.fromParams({ h0: 67.66, omegaM: 0.3111, tCmb: 2.7255 }),
    FlatCosmology.fromParams({ h0: 100, omegaM: 1 }),
  ];
  test.each(models.map((m) => ({ m, label: `Om=${m.omegaM} Or=${m.omegaR.toExponential(2)}` })))(
    '$label: 4 pi int_0^z dV/dz/dOmega dz = V(z), relative 1e-8 (Hogg 1999 eqs. 28-29)',
    ({ m }) => {
      for (const z of [0.05, 0.7, 3, 12]) {
        const v = integrate((t) => m.volumeElementMpc3Sr(t), 0, z, { rel: 1e-13 }).value * 4 * Math.PI;
        expect(rel(v, m.comovingVolumeMpc3(z))).toBeLessThan(1e-8);
      }
    },
  );
  test.each(models.map((m) => ({ m, label: `Om=${m.omegaM}` })))(
    '$label: D_L = (1+z)^2 D_A (exact, to rounding)',
    ({ m }) => {
      for (const z of [0.001, 0.3, 2, 9]) {
        const zp = 1 + z;
        expect(rel(m.luminosityDistanceMpc(z), zp * zp * m.angularDiameterDistanceMpc(z))).toBeLessThan(1e-15);
      }
    },
  );
  test.each(models.map((m) => ({ m, label: `Om=${m.omegaM}` })))(
    '$label: shells add up to the total volume; a thin shell matches dV/dz dz; D_C between = difference',
    ({ m }) => {
      const edges = [0, 0.1, 0.25, 0.5, 1, 1.7, 3, 6];
      let sum = 0;
      for (let i = 0; i + 1 < edges.length; i++) sum += m.comovingVolumeBetweenMpc3Sr(edges[i]!, edges[i + 1]!);
      expect(rel(4 * Math.PI * sum, m.comovingVolumeMpc3(6))).toBeLessThan(1e-12);
      // midpoint rule on a shell of width 1e-4: second-order error about (dz)^2 ~ 1e-8 relative
      for (const z of [0.2, 1.5, 8]) {
        const dz = 1e-4;
        const shell = m.comovingVolumeBetweenMpc3Sr(z - dz / 2, z + dz / 2);
        expect(rel(shell, m.volumeElementMpc3Sr(z) * dz)).toBeLessThan(1e-7);
        expect(
          rel(m.comovingDistanceBetweenMpc(0.3, z), m.comovingDistanceMpc(z) - m.comovingDistanceMpc(0.3)),
        ).toBeLessThan(1e-12);
      }
      expect(m.comovingVolumeBetweenMpc3Sr(2, 1)).toBeCloseTo(-m.comovingVolumeBetweenMpc3Sr(1, 2), 6);
    },
  );
  test.each(models.map((m) => ({ m, label: `Om=${m.omegaM}` })))(
    '$label: lookback(z) + age(z) = age(0) (relative 1e-12); E(0) = 1; dD_C/dz = D_H / E(z)',
    ({ m }) => {
      const age0 = m.ageGyr(0);
      for (const z of [0.01, 0.5, 2, 15]) {
        expect(rel(m.lookbackTimeGyr(z) + m.ageGyr(z), age0)).toBeLessThan(1e-12);
        const h = 1e-4 * (1 + z);
        const deriv = (m.comovingDistanceMpc(z + h) - m.comovingDistanceMpc(z - h)) / (2 * h);
        expect(rel(deriv, m.hubbleDistanceMpc / m.hubbleRatio(z))).toBeLessThan(1e-7);
      }
      expect(m.hubbleRatio(0)).toBeCloseTo(1, 15);
      expect(m.transverseComovingDistanceMpc(1.2)).toBe(m.comovingDistanceMpc(1.2));
    },
  );
});

describe('distances kept by redshift', () => {
  test.each([
    { label: 'closed form', params: { h0: 70, omegaM: 0.3 } },
    { label: 'with radiation', params: { h0: 67.66, omegaM: 0.3111, tCmb: 2.7255 } },
  ])(
    '$label: asked again, in any order and past the 4096 kept, D_C is the fresh computation bit for bit',
    ({ params }) => {
      // a cosmology asked once per redshift computes every distance afresh (the reference)
      const zs = Array.from({ length: 5000 }, (_, i) => 0.01 + ((i * 7919) % 5000) * 0.004);
      const kept = FlatCosmology.fromParams(params);
      const differ: number[] = [];
      for (const round of [0, 1])
        for (const z of round === 0 ? zs : [...zs].reverse()) {
          if (kept.comovingDistanceMpc(z) !== FlatCosmology.fromParams(params).comovingDistanceMpc(z)) differ.push(z);
        }
      expect(differ).toEqual([]);
      expect(() => kept.comovingDistanceMpc(Number.NaN)).toThrow(/redshift must be a finite number/);
      expect(() => kept.comovingDistanceMpc(-1)).toThrow(/redshift must be a finite number/);
    },
  );
});

describe('properties (fast-check)', () => {
  const arbModel = fc.record({
    h0: fc.double({ min: 30, max: 120, noNaN: true }),
    omegaM: fc.double({ min: 0.01, max: 0.99, noNaN: true }),
    tCmb: fc.constantFrom(0, 2.7255),
  });
  test('distances and volume grow with z; age falls; the lookback time grows', () => {
    fc.assert(
      fc.property(
        arbModel,
        fc.double({ min: 0, max: 30, noNaN: true }),
        fc.double({ min: 1e-6, max: 5, noNaN: true }),
        (p, z, dz) => {
          const c = FlatCosmology.fromParams(p);
          const z2 = z + dz;
          return (
            c.comovingDistanceMpc(z2) > c.comovingDistanceMpc(z) &&
            c.luminosityDistanceMpc(z2) > c.luminosityDistanceMpc(z) &&
            c.comovingVolumeMpc3(z2) > c.comovingVolumeMpc3(z) &&
            c.ageGyr(z2) < c.ageGyr(z) &&
            c.lookbackTimeGyr(z2) > c.lookbackTimeGyr(z) &&
            c.comovingVolumeBetweenMpc3Sr(z, z2) > 0
          );
        },
      ),
      { numRuns: 300 },
    );
  });
});

describe('input validation (fromParams goes through the cosmology factory: one SurveyError naming the key)', () => {
  test.each([
    [{ h0: 70, omegaM: 0 }, 'cosmology.omega_m'],
    [{ h0: 70, omegaM: 1.2 }, 'cosmology.omega_m'],
    [{ h0: 0, omegaM: 0.3 }, 'cosmology.h0'],
    [{ h0: NaN, omegaM: 0.3 }, 'cosmology.h0'],
    [{ h0: 70, omegaM: 0.3, tCmb: -1 }, 'cosmology.t_cmb'],
    [{ h0: 70, omegaM: 1, tCmb: 2.7255 }, 'cosmology.t_cmb'],
  ])('%o is rejected', (p, keyPath) => {
    expect(() => FlatCosmology.fromParams(p)).toThrow(expect.objectContaining({ code: 'out_of_range', keyPath }));
  });
  test('negative or non-finite redshift is rejected; z = 0 gives zero distance and no distance modulus', () => {
    const c = FlatCosmology.fromParams({ h0: 70, omegaM: 0.3 });
    expect(() => c.comovingDistanceMpc(-0.1)).toThrow(/redshift must be a finite number >= 0/);
    expect(() => c.comovingDistanceMpc(Infinity)).toThrow(/redshift/);
    expect(c.comovingDistanceMpc(0)).toBe(0);
    expect(() => c.distanceModulus(0)).toThrow(/redshift > 0/);
  });
  test('accepts the Cosmology type of src/model/cosmology.ts', () => {
    const c = new FlatCosmology({ h0: 70, omegaM: 0.3, omegaLambda: 0.7, omegaR: 0, tCmb: 0 });
    expect(c.comovingDistanceMpc(1)).toBeCloseTo(
      FlatCosmology.fromParams({ h0: 70, omegaM: 0.3 }).comovingDistanceMpc(1),
      9,
    );
  });
});
