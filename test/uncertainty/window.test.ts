import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import gammainc from '@stdlib/math-base-special-gammainc';
import { createLinearPower, type LinearPower } from '../../src/uncertainty/power-spectrum.js';
import { boxSigma, equalVolumeRadiusMpc, sincSquaredRule, sphereSigma } from '../../src/uncertainty/window.js';
import { cosmologyOf, planck2018, relErr, type PowerFixtureCosmology } from './helpers.js';

const power = createLinearPower(planck2018);

/** A stand-in spectrum P(k) = fn(k) with D(z) = 1, for closed-form checks of the integrators. */
function syntheticPower(fn: (k: number) => number): LinearPower {
  return {
    ...power,
    form: 'no_wiggle',
    growth: () => 1,
    power: (k: number) => fn(k),
    powerZ0FromK2: (k2: number) => fn(Math.sqrt(k2)),
  };
}

describe('the per-axis sinc^2 rule', () => {
  it.each([1, 5, 100, 3000])(
    'integrates sinc^2 over [0, ∞) to pi/2 for an axis of %s Mpc (closed form; 1e-8, the Gauss-Legendre error on the lobes)',
    (l) => {
      const r = sincSquaredRule(l);
      let s = 0;
      for (const w of r.w) s += w;
      expect(Math.abs(s - Math.PI / 2)).toBeLessThan(1e-8);
    },
  );
});

describe('box sigma: closed forms', () => {
  it('white noise P = P0 gives sigma^2 = P0 / V exactly (closed form; 1e-8)', () => {
    const p = syntheticPower(() => 2500);
    for (const sides of [
      [100, 100, 100],
      [5, 5, 1000],
      [700, 300, 8],
    ] as [number, number, number][]) {
      const v = sides[0] * sides[1] * sides[2];
      expect(relErr(boxSigma(p, 0, sides) ** 2, 2500 / v)).toBeLessThan(1e-8);
    }
  });

  it('a Gaussian spectrum factorises: sigma^2 = A Π F(L_i), F(L) = (2/L^2)[L erf(L/2s)/2 - (s/√π)(1 - e^{-L^2/4s^2})] (closed form; 1e-3)', () => {
    // P(k) = A exp(-k^2 s^2) is the transform of a Gaussian correlation function; the 1-D factor is
    // (1/L^2) ∫∫_0^L g(x - y) dx dy with g(r) = exp(-r^2 / 4s^2) / (2 s √π).
    const s = 12;
    const A = 1e5;
    const p = syntheticPower((k) => A * Math.exp(-k * k * s * s));
    const erf = (x: number): number => gammainc(x * x, 0.5);
    const F = (l: number): number =>
      (2 / (l * l)) * ((l * erf(l / (2 * s))) / 2 - (s / Math.sqrt(Math.PI)) * (1 - Math.exp(-(l * l) / (4 * s * s))));
    for (const sides of [
      [100, 100, 100],
      [5, 5, 1000],
      [2, 3, 3000],
      [800, 800, 10],
      [30, 40, 50],
    ] as [number, number, number][]) {
      const exact = A * F(sides[0]) * F(sides[1]) * F(sides[2]);
      expect(relErr(boxSigma(p, 0, sides) ** 2, exact), sides.join('x')).toBeLessThan(1e-3);
    }
  });
});

interface BoxSigmaFixture {
  header: Record<string, unknown>;
  cosmology: PowerFixtureCosmology;
  white_noise: { sides_mpc: number[]; p0_mpc3: number; rel_err_sigma2: number }[];
  boxes: { name: string; sides_mpc: number[]; z: number; form: 'no_wiggle' | 'full'; growth: number; sigma: number }[];
}

const boxFixture = JSON.parse(
  readFileSync(fileURLToPath(new URL('../reference/box_sigma.json', import.meta.url)), 'utf8'),
) as BoxSigmaFixture;

describe('box sigma: fast rule against the brute-force reference (test/reference/box_sigma.json; tolerance 0.1 %)', () => {
  // Reference: test/reference/generate/box_sigma.py (numpy 1.24, scipy 1.10): a direct triple sum
  // over a fine tensor product of Gauss-Legendre rules (12 to 16 sinc^2 lobes explicit per axis,
  // more for the full form, averaged tail beyond), P from the Eisenstein & Hu 1998 transfer
  // functions of test/reference/generate/power.py; two rules agree to <= 6e-7 and the rule gives
  // white noise P0 / V to 9e-6 (both asserted by the script). Measured: the fast rule agrees with
  // it to 9e-6 (cube), 4e-6 (pencil), 4.1e-5 (slab) and 2.6e-4 (full form, its ln K table step).
  const spectra = {
    no_wiggle: createLinearPower(cosmologyOf(boxFixture.cosmology)),
    full: createLinearPower(cosmologyOf(boxFixture.cosmology), { form: 'full' }),
  };

  it('covers the cube, pencil and slab (no-wiggle, z = 1) and an elongated box in the full form (z = 0.5)', () => {
    expect(boxFixture.boxes.map((b) => `${b.name} ${b.form} ${b.z}`)).toEqual([
      'cube no_wiggle 1',
      'pencil no_wiggle 1',
      'slab no_wiggle 1',
      'elongated_full full 0.5',
    ]);
  });

  it.each(boxFixture.boxes.map((b) => [b.name, b.sides_mpc, b] as const))('%s %j Mpc', (_name, sides, box) => {
    const p = spectra[box.form];
    // the same growth factor (scipy hyp2f1 closed form in the script), 1e-10 as in growth.test.ts
    expect(relErr(p.growth(box.z), box.growth)).toBeLessThan(1e-10);
    expect(relErr(boxSigma(p, box.z, sides), box.sigma)).toBeLessThan(1e-3);
  });
});

describe('box sigma: physical behaviour', () => {
  it.each([10, 50, 100, 300, 1000])(
    'a cube of side %s Mpc has sigma within 5 percent of the sphere of equal volume (common practice; measured <= 2.3 percent)',
    (l) => {
      const sides: [number, number, number] = [l, l, l];
      expect(relErr(boxSigma(power, 0, sides), sphereSigma(power, 0, equalVolumeRadiusMpc(sides)))).toBeLessThan(0.05);
    },
  );

  it('at fixed volume, elongating the box lowers sigma', () => {
    const shapes: [number, number, number][] = [
      [100, 100, 100],
      [50, 100, 200],
      [50, 50, 400],
      [25, 25, 1600],
      [10, 10, 10000],
    ];
    const sig = shapes.map((s) => boxSigma(power, 0, s));
    for (let i = 1; i < sig.length; i++) expect(sig[i]!).toBeLessThan(sig[i - 1]!);
  });

  it('very large boxes have small sigma (4 Gpc cube: sigma < 1e-3) and sigma scales with D(z)', () => {
    expect(boxSigma(power, 0, [4000, 4000, 4000])).toBeLessThan(1e-3);
    expect(relErr(boxSigma(power, 2, [50, 60, 70]) / boxSigma(power, 0, [50, 60, 70]), power.growth(2))).toBeLessThan(
      1e-12,
    );
  });

  it('sigma does not depend on the order of the sides', () => {
    const a = boxSigma(power, 0, [5, 300, 40]);
    expect(boxSigma(power, 0, [300, 40, 5])).toBe(a);
  });

  it('fast-check: sigma decreases when any one side grows', () => {
    fc.assert(
      fc.property(
        fc.tuple(
          fc.double({ min: 1, max: 3000, noNaN: true }),
          fc.double({ min: 1, max: 3000, noNaN: true }),
          fc.double({ min: 1, max: 3000, noNaN: true }),
        ),
        fc.integer({ min: 0, max: 2 }),
        fc.double({ min: 1.05, max: 4, noNaN: true }),
        (sides, axis, factor) => {
          const grown: [number, number, number] = [...sides];
          grown[axis] = grown[axis]! * factor;
          return boxSigma(power, 0, grown) < boxSigma(power, 0, sides);
        },
      ),
      { numRuns: 200, seed: 20240601 },
    );
  });

  it('rejects non-positive or non-finite sides', () => {
    expect(() => boxSigma(power, 0, [0, 1, 1])).toThrow(RangeError);
    expect(() => boxSigma(power, 0, [1, Number.POSITIVE_INFINITY, 1])).toThrow(RangeError);
    expect(() => boxSigma(power, 0, [1, 1])).toThrow(RangeError);
  });
});
