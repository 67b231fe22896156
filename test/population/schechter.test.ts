/**
 * Schechter function identities. References: Schechter 1976 (the form); the luminosity density
 * j = phi* L* Gamma(alpha+2) (common practice; textbook result); the three forms of docs/survey-file.md
 * describe one distribution (change of variables, exact).
 */
import { describe, expect, test } from 'vitest';
import {
  luminosityDensityAbove,
  numberDensityAbove,
  schechterLuminosity,
  schechterMagnitude,
  schechterPerDex,
  totalLuminosityDensity,
} from '../../src/population/schechter.js';
import { integrate } from '../../src/numerics/quadrature.js';
import { gammaFn } from '../../src/numerics/gamma.js';

describe('Schechter forms agree (change of variables, exact)', () => {
  test.each([-0.5, -1.3, -1.9, -2.4])('alpha = %f: per-dex = ln10 L phi(L); magnitude = 0.4 ln10 L phi(L)', (alpha) => {
    const phiStar = 2e-3;
    const lStar = 3e42;
    for (const l of [1e40, 5e41, 3e42, 2e43]) {
      const perL = schechterLuminosity(l, phiStar, lStar, alpha);
      expect(schechterPerDex(Math.log10(l), phiStar, Math.log10(lStar), alpha)).toBeCloseTo(Math.LN10 * l * perL, 12);
      const mStar = -21;
      const m = mStar - 2.5 * Math.log10(l / lStar);
      expect(schechterMagnitude(m, phiStar, mStar, alpha) / (0.4 * Math.LN10 * l * perL)).toBeCloseTo(1, 12);
    }
  });
});

describe('integrals', () => {
  test.each([-0.7, -1.2, -1.8])(
    'luminosity density tends to phi* L* Gamma(alpha+2) (common practice), alpha = %f',
    (alpha) => {
      // The fraction of j above u tends to 1 as u -> 0, with deficit gamma(s, u)/Gamma(s) ~ u^s / (s Gamma(s)),
      // s = alpha + 2 > 0 (leading term of the series of the lower incomplete gamma, DLMF 8.7.1); 1e-3 relative.
      const s = alpha + 2;
      for (const u of [1e-4, 1e-5, 1e-6]) {
        const fraction = luminosityDensityAbove(u, 2.2e-3, 1, alpha) / (2.2e-3 * gammaFn(s));
        const deficit = u ** s / (s * gammaFn(s));
        expect(Math.abs((1 - fraction) / deficit - 1)).toBeLessThan(1e-3);
      }
      expect(totalLuminosityDensity(2.2e-3, 2, alpha)).toBeCloseTo(2.2e-3 * 2 * gammaFn(alpha + 2), 15);
    },
  );
  test('the total luminosity density diverges for alpha <= -2', () => {
    expect(() => totalLuminosityDensity(2.2e-3, 1, -2.1)).toThrow();
  });
  test.each([-0.5, -1.5, -2.2])(
    'number above u equals the direct integral of phi (quadrature, 1e-8), alpha = %f',
    (alpha) => {
      const u = 0.03;
      const direct = integrate((t) => Math.exp((alpha + 1) * t - Math.exp(t)), Math.log(u), Math.log(80), {
        rel: 1e-12,
      }).value;
      expect(numberDensityAbove(u, 1, alpha) / direct).toBeCloseTo(1, 8);
    },
  );
});
