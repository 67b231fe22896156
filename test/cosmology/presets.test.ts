/**
 * Cosmology presets and resolveCosmology.
 * omega_r is checked against astropy 5.2.1 (Ogamma0 + Onu0 of FlatLambdaCDM(67.66, 0.3111,
 * Tcmb0=2.7255, Neff=3.046, m_nu=0), in test/reference/distances.json); the preset numbers are
 * "from memory" of Planck Collaboration 2020, A&A 641, A6 (Planck 2018 VI), Table 2.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import { omegaPhotons, omegaRadiation } from '../../src/cosmology/constants.js';
import { FlatCosmology } from '../../src/cosmology/flat-cosmology.js';
import { PRESETS } from '../../src/cosmology/presets.js';
import { resolveCosmology } from '../../src/cosmology/parameters.js';

const fixture = JSON.parse(readFileSync(new URL('../reference/distances.json', import.meta.url), 'utf8')) as {
  cosmologies: {
    h0: number;
    omega_m: number;
    t_cmb: number;
    astropy: { Ogamma0: number; Onu0: number; Ode0: number };
  }[];
};
const planckLike = fixture.cosmologies.find((c) => c.h0 === 67.66 && c.t_cmb === 2.7255)!;

describe('resolveCosmology', () => {
  test('planck2018: omega_r = Ogamma0 + Onu0 of astropy 5.2.1 (relative 1e-9), about 9.14e-5', () => {
    const c = resolveCosmology({ preset: 'planck2018' });
    const astropyOr = planckLike.astropy.Ogamma0 + planckLike.astropy.Onu0;
    expect(Math.abs(c.omegaR - astropyOr) / astropyOr).toBeLessThan(1e-9);
    expect(c.omegaR).toBeGreaterThan(9.1e-5);
    expect(c.omegaR).toBeLessThan(9.2e-5);
    expect(
      Math.abs(omegaPhotons(67.66, 2.7255) - planckLike.astropy.Ogamma0) / planckLike.astropy.Ogamma0,
    ).toBeLessThan(1e-9);
  });
  test('omega_lambda = 1 - omega_m - omega_r (flat; matches astropy Ode0 to 1e-12)', () => {
    const c = resolveCosmology({ preset: 'planck2018' });
    expect(c.omegaLambda).toBe(1 - c.omegaM - c.omegaR);
    expect(Math.abs(c.omegaLambda - planckLike.astropy.Ode0)).toBeLessThan(1e-12);
  });
  test('keys given override the preset; tCmb = 0 (the default without a preset) means no radiation', () => {
    const c = resolveCosmology({ preset: 'planck2018', omegaM: 0.3 });
    expect(c.omegaM).toBe(0.3);
    expect(c.h0).toBe(67.66);
    const d = resolveCosmology({ h0: 70, omegaM: 0.3 });
    expect(d.omegaR).toBe(0);
    expect(d.omegaLambda).toBe(0.7);
    expect(omegaRadiation(70, 0)).toBe(0);
  });
  test('the resolved cosmology builds a FlatCosmology', () => {
    const c = resolveCosmology({ preset: 'planck2018' });
    const m = new FlatCosmology(c);
    expect(m.omegaR).toBe(c.omegaR);
    expect(m.comovingDistanceMpc(1)).toBeGreaterThan(3000);
  });
  test('an unknown preset or a missing h0 / omega_m throws', () => {
    expect(() => resolveCosmology({ preset: 'nope' })).toThrow(
      expect.objectContaining({ code: 'out_of_range', keyPath: 'cosmology.preset' }),
    );
    expect(() => resolveCosmology({ omegaM: 0.3 })).toThrow(
      expect.objectContaining({ code: 'missing_key', keyPath: 'cosmology.h0' }),
    );
    expect(() => resolveCosmology({ h0: 70 })).toThrow(
      expect.objectContaining({ code: 'missing_key', keyPath: 'cosmology.omega_m' }),
    );
  });
});

describe('presets record their source', () => {
  test('planck2018 holds Planck 2018 VI Table 2 values (from memory: H0 = 67.66, Om = 0.3111, sigma8 = 0.8102, n_s = 0.9665, Ob h^2 = 0.02242)', () => {
    const p = PRESETS.planck2018!;
    expect(p.source).toMatch(/Planck 2018 VI/);
    expect(p.source).toMatch(/Table 2/);
    expect(p.h0).toBe(67.66);
    expect(p.omegaM).toBe(0.3111);
    expect(p.sigma8).toBe(0.8102);
    expect(p.nS).toBe(0.9665);
    expect(p.omegaB * (p.h0 / 100) ** 2).toBeCloseTo(0.02242, 12);
    expect(p.tCmb).toBe(2.7255);
  });
  test('every preset names a published source', () => {
    for (const p of Object.values(PRESETS)) expect(p.source).toMatch(/Planck Collaboration \d{4}, A&A/);
  });
});
