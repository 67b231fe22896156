import { describe, expect, it } from 'vitest';
import gamma from '@stdlib/math-base-special-gamma';
import {
  createHaloModel,
  DELTA_C,
  SHETH_TORMEN,
  shethTormenBias,
  shethTormenMultiplicity,
} from '../../src/uncertainty/haloes.js';
import { computeLinearPower, createLinearPower } from '../../src/uncertainty/power-spectrum.js';
import { adaptiveIntegrate } from '../../src/uncertainty/quadrature.js';
import { planck2018, relErr } from './helpers.js';

const power = createLinearPower(planck2018);
const haloes = createHaloModel(power);

describe('Sheth & Tormen 1999 (MNRAS 308, 119): published properties', () => {
  it('the multiplicity integrates to one over nu: ∫ f(nu) dnu = 1 (1e-3)', () => {
    const total =
      adaptiveIntegrate(shethTormenMultiplicity, 0, 1, 1e-12) +
      adaptiveIntegrate(shethTormenMultiplicity, 1, 40, 1e-12);
    expect(Math.abs(total - 1)).toBeLessThan(1e-3);
  });

  it('the normalisation A = 0.3222 is 1 / (1 + 2^-p Gamma(1/2 - p) / sqrt(pi)) (ST99 eq. 10 normalisation; 1e-4)', () => {
    const { p, A } = SHETH_TORMEN;
    expect(relErr(A, 1 / (1 + (2 ** -p * gamma(0.5 - p)) / Math.sqrt(Math.PI)))).toBeLessThan(1e-4);
  });

  it('the mass-weighted bias is one: ∫ b(nu) f(nu) dnu = 1 (ST99 sect. 4, peak-background split; 1e-3)', () => {
    const g = (nu: number): number => shethTormenBias(nu) * shethTormenMultiplicity(nu);
    const total = adaptiveIntegrate(g, 0, 1, 1e-12) + adaptiveIntegrate(g, 1, 40, 1e-12);
    expect(Math.abs(total - 1)).toBeLessThan(1e-3);
  });

  it('bias exceeds 1 above nu ≈ 1 and grows with nu (nu = delta_c / sigma convention)', () => {
    expect(shethTormenBias(0.5)).toBeLessThan(1);
    expect(shethTormenBias(2)).toBeGreaterThan(1);
    for (let nu = 0.2; nu < 6; nu += 0.1) expect(shethTormenBias(nu + 0.1)).toBeGreaterThan(shethTormenBias(nu));
    // b(nu) at nu^2 = 1/a reduces to 1 + p / delta_c (closed form of the same expression)
    expect(relErr(shethTormenBias(Math.sqrt(1 / SHETH_TORMEN.a)), 1 + SHETH_TORMEN.p / DELTA_C)).toBeLessThan(1e-12);
  });
});

describe('mass function and bias in a cosmology (internal consistency)', () => {
  it('the tabulated sigma(M) matches the direct integral (1e-5) and its slope the finite difference (1e-4)', () => {
    for (const m of [1e6, 1e9, 1e12, 1e15]) {
      expect(relErr(haloes.sigma(m, 1), power.sigmaM(m, 1))).toBeLessThan(1e-5);
      const e = 1e-3;
      const fd = (Math.log(power.sigmaM(m * Math.exp(e), 0)) - Math.log(power.sigmaM(m * Math.exp(-e), 0))) / (2 * e);
      // dn/dlnM = (rho/M) f(nu) nu |dln sigma/dln M|, so the slope is recovered from the mass function
      const nu = haloes.peakHeight(m, 0);
      const slope = (haloes.massFunctionPerLnM(m, 0) * m) / (power.rhoM0MsunMpc3 * shethTormenMultiplicity(nu) * nu);
      expect(relErr(slope, -fd)).toBeLessThan(1e-4);
    }
  });

  it('n(>M) equals the integral of dn/dlnM (adaptive quadrature; 1e-6)', () => {
    const m0 = 1e11;
    const direct = adaptiveIntegrate(
      (lnM) => haloes.massFunctionPerLnM(Math.exp(lnM), 1),
      Math.log(m0),
      Math.log(1e17),
      1e-10,
    );
    expect(relErr(haloes.haloDensityAboveMpc3(m0, 1), direct)).toBeLessThan(1e-6);
  });

  it('n(>M) falls with M; effective bias above M is at least the bias at M and grows with M and z', () => {
    let lastN = Infinity;
    let lastB = 0;
    for (let lm = 7; lm <= 15; lm += 0.5) {
      const m = 10 ** lm;
      const n = haloes.haloDensityAboveMpc3(m, 2);
      const b = haloes.effectiveBiasAbove(m, 2);
      expect(n).toBeLessThan(lastN);
      expect(b).toBeGreaterThan(lastB);
      expect(b).toBeGreaterThanOrEqual(haloes.haloBias(m, 2));
      lastN = n;
      lastB = b;
    }
    expect(haloes.effectiveBiasAbove(1e11, 4)).toBeGreaterThan(haloes.effectiveBiasAbove(1e11, 1));
  });
});

describe('abundance matching (Trenti & Stiavelli 2008, ApJ 676, 767)', () => {
  it.each([
    [1e-2, 1, 1],
    [1e-3, 2, 0.5],
    [1e-4, 6, 0.2],
    [3e-6, 0.5, 1],
  ])('density %s Mpc^-3 at z = %s, occupation %s: n(>M_min) = density / occupation (1e-6)', (n, z, occ) => {
    const r = haloes.matchHaloMass(n, z, occ);
    expect(r.haloMassMinMsun).toBeGreaterThan(1e6);
    expect(r.haloMassMinMsun).toBeLessThan(1e16);
    expect(relErr(haloes.haloDensityAboveMpc3(r.haloMassMinMsun, z), n / occ)).toBeLessThan(1e-6);
    expect(relErr(r.bias, haloes.effectiveBiasAbove(r.haloMassMinMsun, z))).toBeLessThan(1e-9);
  });

  it('a lower occupation means more haloes, hence a lower mass and bias', () => {
    const full = haloes.matchHaloMass(1e-3, 2, 1);
    const half = haloes.matchHaloMass(1e-3, 2, 0.1);
    expect(half.haloMassMinMsun).toBeLessThan(full.haloMassMinMsun);
    expect(half.bias).toBeLessThan(full.bias);
  });

  it('a density above what haloes above 1e6 Msun provide, or below what haloes above 1e16 Msun provide, is a clear error', () => {
    expect(() => haloes.matchHaloMass(1e4, 2, 1)).toThrow(/exceeds .* haloes above 1e\+6 Msun/);
    expect(() => haloes.matchHaloMass(1e-40, 0, 1)).toThrow(/below .* haloes above 1e\+16 Msun/);
    expect(() => haloes.matchHaloMass(1e-3, 2, 0)).toThrow(RangeError);
    expect(() => haloes.matchHaloMass(1e-3, 2, 1.5)).toThrow(RangeError);
    expect(() => haloes.matchHaloMass(0, 2, 1)).toThrow(RangeError);
  });
});

describe('the tabulated matcher (matcherAt) against the direct one (internal consistency)', () => {
  it('matches the same halo mass and bias as matchHaloMass (1e-8), holds at the bounds, and inverts the effective bias (1e-8)', () => {
    for (const z of [0, 0.8, 3, 6]) {
      const m = haloes.matcherAt(z);
      for (const density of [1e-1, 1e-3, 1e-5, 1e-7]) {
        const direct = haloes.matchHaloMass(density, z, 1);
        const table = m.match(density);
        expect(table.held).toBeUndefined();
        expect(relErr(table.haloMassMinMsun, direct.haloMassMinMsun)).toBeLessThan(1e-8);
        expect(relErr(table.bias, direct.bias)).toBeLessThan(1e-8);
        // the mass whose haloes above it have this bias is the matched mass
        expect(relErr(m.massForBias(direct.bias)!, direct.haloMassMinMsun)).toBeLessThan(1e-8);
      }
      expect(m.match(1e6).held).toBe('min');
      expect(m.match(0.5 * haloes.haloDensityAboveMpc3(1e16, z)).held).toBe('max');
      expect(m.massForBias(0.01)).toBeUndefined();
    }
  });
});

describe('matcherAt sums its table only as far down as a match needs, and keeps its matches', () => {
  it('gives bit for bit what the whole table gives (a matcher made whole first by massForBias), at the bounds too, and again when asked again', () => {
    for (const z of [0, 0.45, 1.7, 4.2]) {
      const densities = [3, 1e-1, 2e-2, 1e-3, 4e-5, 1e-7, 1e-9, 0.5 * haloes.haloDensityAboveMpc3(1e16, z), 1e6];
      const whole = haloes.matcherAt(z);
      whole.massForBias(1.5);
      const wholeMatches = densities.map((n) => whole.match(n));
      // a fresh matcher per density (each sums only its own part), and one asked in falling then rising order
      expect(densities.map((n) => haloes.matcherAt(z).match(n))).toEqual(wholeMatches);
      const lazy = haloes.matcherAt(z);
      expect([...densities].reverse().map((n) => lazy.match(n))).toEqual([...wholeMatches].reverse());
      expect(lazy.massForBias(1.5)).toBe(whole.massForBias(1.5));
      // asked again: the kept matches, the same numbers
      expect(densities.map((n) => lazy.match(n))).toEqual(wholeMatches);
    }
  });
});

describe('densityAboveReaches sums the abundance tables only as far as its answer needs', () => {
  it('answers as the comparison with haloDensityAboveMpc3 does, on fresh tables (n > target, n >= target), at and around the exact abundance', () => {
    for (const z of [0, 0.45, 1.7, 4.2, 7.5]) {
      for (const mass of [1e6, 3e9, 1e12, 1e16, 5e2, 3e16]) {
        const exact = haloes.haloDensityAboveMpc3(mass, z);
        // a model of its own (a spectrum outside the cache), whose tables start empty
        const fresh = createHaloModel(computeLinearPower(planck2018));
        const targets = [
          1e-40,
          1e-3 * exact,
          0.5 * exact,
          exact * (1 - 1e-15),
          exact,
          exact * (1 + 1e-15),
          2 * exact,
          1e3,
        ];
        for (const t of targets) {
          expect(fresh.densityAboveReaches(mass, z, t, false)).toBe(exact > t);
          expect(fresh.densityAboveReaches(mass, z, t, true)).toBe(exact >= t);
        }
        // and the abundance it then gives is the same number, bit for bit
        expect(fresh.haloDensityAboveMpc3(mass, z)).toBe(exact);
      }
    }
  });
});
