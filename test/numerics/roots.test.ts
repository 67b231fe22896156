/** Brent's method and bracket expansion against roots known in closed form or to 16 digits. */
import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { bisectCrossing, brent, expandBracket } from '../../src/numerics/roots.js';

describe('brent', () => {
  test('x^2 - 2 on [0, 2] gives sqrt 2 (closed form, absolute 1e-14)', () => {
    expect(Math.abs(brent((x) => x * x - 2, 0, 2, { tol: 1e-15 }) - Math.SQRT2)).toBeLessThan(1e-14);
  });
  test('cos x = x gives the Dottie number 0.7390851332151607 (from memory; also checked by the residual)', () => {
    const r = brent((x) => Math.cos(x) - x, 0, 1, { tol: 1e-15 });
    expect(Math.abs(r - 0.7390851332151607)).toBeLessThan(1e-14);
    expect(Math.abs(Math.cos(r) - r)).toBeLessThan(1e-15);
  });
  test('x e^x = 1 gives the omega constant W(1) = 0.5671432904097838 (DLMF 4.13, from memory; residual checked)', () => {
    const r = brent((x) => x * Math.exp(x) - 1, 0, 1, { tol: 1e-15 });
    expect(Math.abs(r - 0.5671432904097838)).toBeLessThan(1e-14);
  });
  test('a root at an end is returned as is; a steep function (x^21) still converges', () => {
    expect(brent((x) => x - 3, 3, 5)).toBe(3);
    expect(Math.abs(brent((x) => Math.pow(x - 0.25, 21), -1, 2, { tol: 1e-14 }) - 0.25)).toBeLessThan(0.05);
  });
  test('throws a clear Error when the bracket has no sign change', () => {
    expect(() => brent((x) => x * x + 1, -1, 1)).toThrow(/same sign at both ends of \[-1, 1\]/);
  });
  test('throws when the function is not finite at an end', () => {
    expect(() => brent((x) => 1 / x, 0, 1)).toThrow(/not finite/);
  });
  test('property: the root of (x - r)(x^2 + 1) is found to 1e-10 for any r in [-100, 100]', () => {
    fc.assert(
      fc.property(fc.double({ min: -100, max: 100, noNaN: true }), (r) => {
        const x = brent((t) => (t - r) * (t * t + 1), -101, 101, { tol: 1e-12 });
        return Math.abs(x - r) < 1e-10;
      }),
    );
  });
});

describe('expandBracket', () => {
  test('widens [0, 1] until it holds the root of x - 10', () => {
    const [a, b] = expandBracket((x) => x - 10, 0, 1);
    expect(a).toBeLessThanOrEqual(10);
    expect(b).toBeGreaterThanOrEqual(10);
    expect(brent((x) => x - 10, a, b)).toBeCloseTo(10, 10);
  });
  test('moves the lower end when the root is below', () => {
    const [a, b] = expandBracket((x) => x + 50, 0, 1);
    expect(a).toBeLessThanOrEqual(-50);
    expect(b).toBeGreaterThanOrEqual(-50);
  });
  test('respects hard limits and throws when no sign change exists', () => {
    expect(() => expandBracket((x) => x * x + 1, -1, 1)).toThrow(/no sign change/);
    expect(() => expandBracket((x) => x - 10, 0, 1, { upper: 5 })).toThrow(/no sign change/);
  });
});

describe('bisectCrossing', () => {
  test('x^2 = 2 on [0, 2]: sqrt(2) (closed form) to 4e-16', () => {
    expect(Math.abs(bisectCrossing((x) => x * x, 2, 0, 2, 0) - Math.SQRT2)).toBeLessThan(4e-16);
  });
  test('a jump: where a step from 0 to 1 at z = 1.37 crosses 0.5, to 1e-15 (the step itself)', () => {
    const step = (z: number) => (z < 1.37 ? 0 : 1);
    expect(Math.abs(bisectCrossing(step, 0.5, 1.2, 1.5, 0) - 1.37)).toBeLessThan(1e-15);
  });
  test('a falling function: exp(-z) = 0.5 at ln 2 (closed form), from either sign', () => {
    expect(Math.abs(bisectCrossing((z) => Math.exp(-z), 0.5, 0, 2, 1) - Math.LN2)).toBeLessThan(1e-15);
  });
});
