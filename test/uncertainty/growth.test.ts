import { describe, expect, it } from 'vitest';
import { carrollPressTurnerGrowth, createGrowth, linearGrowth } from '../../src/uncertainty/growth.js';
import { powerFixture, relErr } from './helpers.js';

describe('linear growth: closed forms', () => {
  it.each([0, 0.5, 1, 3, 10, 100])(
    'Einstein-de Sitter (omega_m = 1): D = 1/(1+z) exactly at z = %s (1e-8; closed form)',
    (z) => {
      expect(Math.abs(linearGrowth(1, z) - 1 / (1 + z))).toBeLessThan(1e-8);
    },
  );

  it('D(0) = 1 and D decreases with z', () => {
    const d = createGrowth(0.3);
    expect(d(0)).toBe(1);
    let last = 1;
    for (let z = 0.1; z < 20; z += 0.1) {
      const v = d(z);
      expect(v).toBeLessThan(last);
      last = v;
    }
  });
});

describe('linear growth: kept by redshift', () => {
  it('createGrowth asked again, in any order and past the 4096 kept, gives linearGrowth bit for bit (the same arithmetic)', () => {
    const d = createGrowth(0.3111);
    const zs = Array.from({ length: 5000 }, (_, i) => ((i * 7919) % 5000) * 0.003);
    const differ: number[] = [];
    for (const z of [...zs, ...[...zs].reverse()]) if (d(z) !== linearGrowth(0.3111, z)) differ.push(z);
    expect(differ).toEqual([]);
    expect(() => d(Number.NaN)).toThrow(RangeError);
  });
});

describe('linear growth: reference library', () => {
  // scipy 1.10.1 hyp2f1 closed form D ∝ a 2F1(1/3, 1; 11/6; -a^3 OL/Om) (test/reference/power.json), 1e-10
  for (const entry of powerFixture.cosmologies) {
    it.each(entry.growth.map((g) => [g.z, g.d]))(
      `${entry.cosmology.name}: D(z = %s) matches scipy hyp2f1 (1e-10)`,
      (z, d) => {
        expect(relErr(linearGrowth(entry.cosmology.omega_m, z), d)).toBeLessThan(1e-10);
      },
    );
  }
});

describe('linear growth: published approximation', () => {
  // Carroll, Press & Turner 1992, ARA&A 30, 499, eq. 29; the fit is good to ~1 % for flat models,
  // so a 1.5 % tolerance is used (our choice). At omega_m = 0.1 the fit is ~2 % off, so the
  // cases start at 0.2.
  const cases: [number, number][] = [];
  for (const om of [0.2, 0.25, 0.3, 0.5, 0.8]) for (const z of [0.25, 0.5, 1, 2, 5]) cases.push([om, z]);
  it.each(cases)('omega_m = %s, z = %s: D(z) within 1.5 percent of g(z)/(g(0)(1+z))', (om, z) => {
    expect(relErr(linearGrowth(om, z), carrollPressTurnerGrowth(om, z))).toBeLessThan(0.015);
  });
  it('g(Om = 0.3, OL = 0.7) ≈ 0.779 (the growth suppression of a flat Omega_m = 0.3 universe, Carroll, Press & Turner 1992; from memory; 0.5 %)', () => {
    // D(z) = g(z) / (g(0) (1+z)) and g -> 1 in matter domination, so 1 / (D(z)(1+z)) -> g(0) at high z.
    expect(Math.abs(1 / (linearGrowth(0.3, 1000) * 1001) - 0.779)).toBeLessThan(0.004);
  });
});

describe('linear growth: bad input', () => {
  it('rejects omega_m outside (0, 1] and z <= -1', () => {
    expect(() => linearGrowth(0, 1)).toThrow(RangeError);
    expect(() => linearGrowth(1.2, 1)).toThrow(RangeError);
    expect(() => linearGrowth(0.3, -1)).toThrow(RangeError);
    expect(() => linearGrowth(0.3, Number.NaN)).toThrow(RangeError);
  });
});
