/**
 * The bound that stops the draws' completeness quadrature (src/counts/model-draws.ts, tailBound)
 * against the Schechter tail it bounds, schechterBetween(components, log10 u, Infinity): the
 * incomplete gamma functions there are checked against mpmath in test/numerics/gamma.test.ts.
 * It must never fall below the tail (a stop by it leaves out no more than a stop by the tail
 * itself) and, where it is finite and u >= |s - 1| (s = alpha + 1 + power), exceed it by at most a
 * factor of 2: for s > 1 it is the tail's leading term over 1 - (s - 1)/u <= 1/2 (it is finite only
 * for u > 2 (s - 1)), for s <= 1 the tail is at least u^(s-1) e^-u u / (u + 1 - s) (from memory: the
 * continued fraction's first convergent). Once u > 100 (|s - 1| + 1) it is within 1 % of the tail.
 */
import { describe, expect, test } from 'vitest';
import { tailBound } from '../../src/counts/model-draws.js';
import { schechterBetween } from '../../src/counts/engine.js';

describe('tailBound bounds the Schechter tail beyond u', () => {
  const alphas = [-2.3, -1.9, -1.3, -0.7, 0, 0.6, 1.8];
  test.each([0, 1] as const)('power %d: never below the tail, within a factor of 2 where finite', (power) => {
    let finite = 0;
    for (const alpha of alphas)
      for (let l10u = -1.5; l10u <= 2.85; l10u += 0.05) {
        const comps = [{ phiStar: 2.7, alpha }];
        const tail = schechterBetween(comps, l10u, Infinity, power);
        const b = tailBound(comps, l10u, power);
        // (equal for s = 1, where both are e^-u: 1e-14 for their rounding)
        expect(b, `alpha ${alpha}, log10 u ${l10u}`).toBeGreaterThanOrEqual(tail * (1 - 1e-14));
        const u = 10 ** l10u;
        const sm1 = Math.abs(alpha + power);
        if (Number.isFinite(b) && u >= sm1) {
          finite++;
          expect(b / tail, `alpha ${alpha}, log10 u ${l10u}`).toBeLessThanOrEqual(2);
          if (u > 100 * (sm1 + 1)) expect(b / tail).toBeLessThan(1.01);
        }
      }
    expect(finite).toBeGreaterThan(250);
  });

  test('two components: the sum of the bounds; Infinity where one has none', () => {
    const comps = [
      { phiStar: 1.5, alpha: -1.6 },
      { phiStar: 0.4, alpha: 2.5 },
    ];
    expect(tailBound(comps, 1, 0)).toBeCloseTo(tailBound([comps[0]!], 1, 0) + tailBound([comps[1]!], 1, 0), 14);
    expect(tailBound(comps, 1, 0)).toBeGreaterThanOrEqual(schechterBetween(comps, 1, Infinity, 0));
    // u = 1.26 below 2 (s - 1) = 5 for the second component: no bound
    expect(tailBound(comps, 0.1, 0)).toBe(Infinity);
  });
});
