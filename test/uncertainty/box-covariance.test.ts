/**
 * The covariance of two slices' boxes of one field (src/uncertainty/box-covariance.ts) and the
 * correlation matrix the forecasts and plans use for the slices' cosmic-variance nuisances.
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import gammainc from '@stdlib/math-base-special-gammainc';
import { createLinearPower, type LinearPower } from '../../src/uncertainty/power-spectrum.js';
import { boxSigma } from '../../src/uncertainty/window.js';
import {
  boxCovariance0,
  keptSliceSums,
  keptSliceSumsBytes,
  sliceCorrelations,
} from '../../src/uncertainty/box-covariance.js';
import { cholesky } from '../../src/numerics/linalg.js';
import { FlatCosmology } from '../../src/cosmology/flat-cosmology.js';
import { cosmologyOf, relErr, type PowerFixtureCosmology } from './helpers.js';

interface CovarianceFixture {
  cosmology: PowerFixtureCosmology;
  pairs: {
    name: string;
    box_a_mpc: [number, number, number];
    box_b_mpc: [number, number, number];
    separation_mpc: number;
    covariance_z0: number;
  }[];
}

const fixture = JSON.parse(
  readFileSync(fileURLToPath(new URL('../reference/box_covariance.json', import.meta.url)), 'utf8'),
) as CovarianceFixture;

const power = createLinearPower(cosmologyOf(fixture.cosmology));

/** A stand-in spectrum P(k) = fn(k) with D(z) = 1, for closed-form checks. */
function syntheticPower(fn: (k: number) => number): LinearPower {
  return { ...power, growth: () => 1, power: (k: number) => fn(k), powerZ0FromK2: (k2: number) => fn(Math.sqrt(k2)) };
}

describe('box covariance against the independent integration (test/reference/box_covariance.json)', () => {
  // Reference: test/reference/generate/box_covariance.py (numpy, scipy): polar angle of the
  // transverse wavevector by QUADPACK with each box's exact sides, the line-of-sight integral with
  // cos(k d) by Gauss-Legendre panels and QUADPACK's Fourier integral to infinity; two settings
  // agree to 2e-5 (asserted by the script), and its variance of a box equals box_sigma.py's
  // brute-force triple sum to 2e-5 (asserted).
  it.each(fixture.pairs.map((p) => [p.name, p] as const))('%s', (_name, p) => {
    const c = boxCovariance0(power, p.box_a_mpc, p.box_b_mpc, p.separation_mpc);
    // relative to the geometric mean of the two variances (the scale of a correlation)
    const scale = Math.sqrt(
      boxCovariance0(power, p.box_a_mpc, p.box_a_mpc, 0) * boxCovariance0(power, p.box_b_mpc, p.box_b_mpc, 0),
    );
    expect(Math.abs(c - p.covariance_z0) / scale).toBeLessThan(TOLERANCE);
  });
});

/**
 * Measured against the reference, in units of sqrt(C_aa C_bb): 4e-5 (adjacent narrow-band slices,
 * widths 71 and 72 Mpc), 1.2e-5 (next but one), 9e-6 (touching pencils, widths 5 and 5.5 Mpc) and
 * 1.3e-3 (widths 50 and 60 Mpc: the geometric mean of the transverse sides, 1 % of that covariance).
 */
const TOLERANCE = 2e-3;

describe('box covariance: closed forms', () => {
  // A Gaussian spectrum P = A exp(-k^2 s^2) is the transform of the Gaussian correlation
  // function g(r) = exp(-r^2 / 4 s^2) / (2 s sqrt(pi)) per axis, so the covariance factorises into
  // 1-D double integrals of g over the two segments (closed form with erf; common practice):
  //   (1 / (L_a L_b)) [G(d + A + B) + G(d - A - B) - G(d + A - B) - G(d - A + B)],
  //   G(x) = x erf(x / 2s) / 2 + (s / sqrt(pi)) exp(-x^2 / 4 s^2), A = L_a / 2, B = L_b / 2.
  const s = 12;
  const A0 = 1e5;
  const gaussian = syntheticPower((k) => A0 * Math.exp(-k * k * s * s));
  const erf = (x: number): number => Math.sign(x) * gammainc(x * x, 0.5);
  const G = (x: number): number =>
    (x * erf(x / (2 * s))) / 2 + (s / Math.sqrt(Math.PI)) * Math.exp(-(x * x) / (4 * s * s));
  const segment = (la: number, lb: number, d: number): number => {
    const a = la / 2;
    const b = lb / 2;
    return (G(d + a + b) + G(d - a - b) - G(d + a - b) - G(d - a + b)) / (la * lb);
  };
  const exact = (w: number, h: number, la: number, lb: number, d: number): number =>
    A0 * segment(w, w, 0) * segment(h, h, 0) * segment(la, lb, d);

  it.each([
    [80, 80, 30, 30, 30],
    [80, 80, 30, 30, 60],
    [80, 60, 30, 50, 40],
    [5, 5, 150, 170, 160],
    [300, 300, 10, 10, 0],
    [40, 40, 20, 20, 200],
  ])(
    'transverse %s x %s Mpc, radial %s and %s Mpc, %s Mpc apart (closed form; 2e-4 of sqrt(C_aa C_bb), measured <= 1.01e-4)',
    (w, h, la, lb, d) => {
      const c = boxCovariance0(gaussian, [w, h, la], [w, h, lb], d);
      const scale = Math.sqrt(exact(w, h, la, la, 0) * exact(w, h, lb, lb, 0));
      expect(Math.abs(c - exact(w, h, la, lb, d)) / scale).toBeLessThan(2e-4);
    },
  );

  it('equals the box variance of window.ts for one box at no separation (common practice; 1e-4)', () => {
    for (const sides of [
      [100, 100, 100],
      [5, 5, 1000],
      [500, 500, 10],
      [60, 40, 30],
    ] as [number, number, number][]) {
      expect(relErr(boxCovariance0(power, sides, sides, 0), boxSigma(power, 0, sides) ** 2)).toBeLessThan(1e-4);
    }
  });
});

describe('the slices correlation matrix', () => {
  it('is symmetric with unit diagonal, within [-1, 1], positive definite, and falls with separation (common practice)', () => {
    // five adjacent 35 Mpc slices of a 72 Mpc wide field (the narrow-band sample's size)
    const boxes = [0, 1, 2, 3, 4].map((i) => ({
      sides: [72 + i, 72 + i, 35] as const,
      centreMpc: 2800 + 35 * i,
    }));
    const r = sliceCorrelations(power, boxes);
    for (let i = 0; i < 5; i++) {
      expect(r[i]![i]).toBe(1);
      for (let j = 0; j < 5; j++) {
        expect(r[i]![j]).toBe(r[j]![i]);
        expect(Math.abs(r[i]![j]!)).toBeLessThanOrEqual(1);
      }
    }
    expect(cholesky(r)).toBeDefined();
    for (let i = 0; i + 2 < 5; i++) expect(Math.abs(r[i]![i + 2]!)).toBeLessThan(r[i]![i + 1]!);
  });
});

/** n slices equal in z over [z0, z1] of one field of areaDeg2, as slicesCorrelation makes them. */
function slices(z0: number, z1: number, n: number, areaDeg2: number) {
  const cosmo = new FlatCosmology(cosmologyOf(fixture.cosmology));
  return Array.from({ length: n }, (_, i) => {
    const a = z0 + ((z1 - z0) * i) / n;
    const b = z0 + ((z1 - z0) * (i + 1)) / n;
    const c1 = cosmo.comovingDistanceMpc(a);
    const c2 = cosmo.comovingDistanceMpc(b);
    const w = Math.sqrt(areaDeg2 * (Math.PI / 180) ** 2) * cosmo.transverseComovingDistanceMpc(0.5 * (a + b));
    return { sides: [w, 0.8 * w, c2 - c1] as const, centreMpc: 0.5 * (c1 + c2) };
  });
}

describe('the tabulated correlations (sliceCorrelations) against the direct integral of each pair (boxCovariance0)', () => {
  // Measured: |R - R_direct| <= 3.5e-6 (narrow-band, R up to 0.63), 1.8e-5 (six slices of 0.17 in
  // z), 2.2e-5 (twelve slices of a 0.1 deg^2 field) and 9.6e-6 (z = 4-8; there R <= 0.06): the
  // Lagrange cubics in ln w between transverse nodes 0.1 apart and the k_z rule shared by all pairs.
  it.each([
    [2.2, 2.25, 5, 1],
    [0.8, 1.8, 6, 2],
    [0.3, 1.5, 12, 0.1],
    [4, 8, 9, 0.05],
  ])('%s < z < %s in %s slices of %s deg^2: every pair to 1e-4', (z0, z1, n, area) => {
    const boxes = slices(z0, z1, n, area);
    const r = sliceCorrelations(power, boxes);
    const v = boxes.map((b) => boxCovariance0(power, b.sides, b.sides, 0));
    for (let i = 0; i < n; i++)
      for (let j = i + 1; j < n; j++) {
        const direct =
          boxCovariance0(power, boxes[i]!.sides, boxes[j]!.sides, boxes[j]!.centreMpc - boxes[i]!.centreMpc) /
          Math.sqrt(v[i]! * v[j]!);
        expect(Math.abs(r[i]![j]! - direct), `${i} ${j}: ${r[i]![j]} vs ${direct}`).toBeLessThan(1e-4);
      }
  });

  it('two slices of the reference: the correlation times the direct variances gives its covariance (2e-3 as above)', () => {
    let checked = 0;
    for (const p of fixture.pairs) {
      const a = { sides: p.box_a_mpc, centreMpc: 0 };
      const b = { sides: p.box_b_mpc, centreMpc: p.separation_mpc };
      if (Math.abs(p.box_a_mpc[1] / p.box_a_mpc[0] - p.box_b_mpc[1] / p.box_b_mpc[0]) > 1e-12) continue;
      const scale = Math.sqrt(
        boxCovariance0(power, p.box_a_mpc, p.box_a_mpc, 0) * boxCovariance0(power, p.box_b_mpc, p.box_b_mpc, 0),
      );
      const r = sliceCorrelations(power, [a, b])[0]![1]!;
      expect(Math.abs(r * scale - p.covariance_z0) / scale, p.name).toBeLessThan(TOLERANCE);
      checked++;
    }
    expect(checked).toBe(fixture.pairs.length);
  });

  it('the same numbers whatever was asked before (the kept sums are those a fresh start makes)', () => {
    const boxes = slices(0.8, 1.8, 6, 2);
    const first = sliceCorrelations(power, boxes);
    // another area: other transverse nodes, some shared
    sliceCorrelations(
      power,
      boxes.map((b) => ({ ...b, sides: [b.sides[0] * 1.3, b.sides[1] * 1.3, b.sides[2]] as const })),
    );
    expect(sliceCorrelations(power, boxes)).toEqual(first);
  });

  it('refuses slices of different shapes (height over width)', () => {
    const boxes = slices(0.8, 1.8, 2, 2);
    expect(() => sliceCorrelations(power, [boxes[0]!, { ...boxes[1]!, sides: [100, 100, 50] as const }])).toThrow(
      /height over width/,
    );
  });
});

describe('many slices: the correlations from real space (sliceCorrelations above 16 slices)', () => {
  // 100 slices of the narrow-band sample's range (1.6 Mpc deep in a 69 Mpc wide field), 100
  // thinner ones at z = 2.2 (0.66 Mpc deep), and 100 slices 44 Mpc deep in a 6.8 Mpc wide field
  // (each slice deeper than the field is wide, the pairs up to 4,400 Mpc apart)
  const sets = [
    [0.7835, 0.843, 100, 2.1],
    [2.2, 2.25, 100, 1],
    [0.3, 1.5, 100, 0.1],
  ] as const;
  const pairs = [
    [0, 1],
    [49, 50],
    [98, 99],
    [0, 2],
    [10, 13],
    [0, 10],
    [20, 80],
    [0, 99],
  ] as const;

  // Measured: |R - R_direct| <= 2.8e-6, 3.7e-6 and 8.0e-7 on these pairs of the three sets.
  it.each(sets)(
    '%s < z < %s in %s slices of %s deg^2: neighbours and far pairs against the direct integral (boxCovariance0) to 1e-4',
    (z0, z1, n, area) => {
      const boxes = slices(z0, z1, n, area);
      // every node in real space (fresh tables: a copy of the spectrum is another key)
      const r = sliceCorrelations({ ...power }, boxes, { method: 'spatial' });
      const v = boxes.map((b) => boxCovariance0(power, b.sides, b.sides, 0));
      for (const [i, j] of pairs) {
        const direct =
          boxCovariance0(power, boxes[i]!.sides, boxes[j]!.sides, boxes[j]!.centreMpc - boxes[i]!.centreMpc) /
          Math.sqrt(v[i]! * v[j]!);
        expect(Math.abs(r[i]![j]! - direct), `${i} ${j}: ${r[i]![j]} vs ${direct}`).toBeLessThan(1e-4);
      }
    },
  );

  // Measured: every pair within 3.4e-7, 5.7e-7 and 1.1e-7 of the pair-by-pair sums (the same k_z
  // rule: what differs is the cubic interpolation of Ξ in r, gridStep's bound 2e-4).
  it.each(sets)(
    '%s < z < %s in %s slices of %s deg^2: every pair within 2e-6 of the pair-by-pair sums',
    (z0, z1, n, area) => {
      const boxes = slices(z0, z1, n, area);
      const pairwise = sliceCorrelations({ ...power }, boxes, { method: 'pairs' });
      for (const method of ['spatial', 'auto'] as const) {
        const r = sliceCorrelations({ ...power }, boxes, { method });
        for (let i = 0; i < n; i++)
          for (let j = 0; j < n; j++)
            expect(Math.abs(r[i]![j]! - pairwise[i]![j]!), `${method} ${i} ${j}`).toBeLessThan(2e-6);
      }
    },
  );

  it('200 slices: unit diagonal, symmetric, positive semi-definite (Cholesky with 1e-10 on the diagonal)', () => {
    for (const [z0, z1, area] of [
      [0.7835, 0.843, 2.1],
      [0.3, 1.5, 0.1],
    ] as const) {
      const n = 200;
      const r = sliceCorrelations({ ...power }, slices(z0, z1, n, area));
      for (let i = 0; i < n; i++) {
        expect(r[i]![i]).toBe(1);
        for (let j = 0; j < n; j++) expect(r[i]![j]).toBe(r[j]![i]);
      }
      expect(cholesky(r.map((row, i) => row.map((x, j) => (i === j ? x + 1e-10 : x))))).toBeDefined();
    }
  });

  it('the same numbers whatever was asked before, in real space too', () => {
    const p = { ...power };
    const boxes = slices(0.7835, 0.843, 100, 2.1);
    const first = sliceCorrelations(p, boxes);
    sliceCorrelations(
      p,
      boxes.map((b) => ({ ...b, sides: [b.sides[0] * 1.3, b.sides[1] * 1.3, b.sides[2]] as const })),
    );
    expect(sliceCorrelations(p, boxes)).toEqual(first);
    expect(sliceCorrelations({ ...power }, boxes)).toEqual(first);
  });

  it('keeps the matrices of other slice sets within keptSliceSums.limitBytes, and gives the same numbers after dropping them', () => {
    const p = { ...power };
    const limit = keptSliceSums.limitBytes;
    try {
      // a bound below one set's matrices: only the set in use is kept
      keptSliceSums.limitBytes = 1;
      const wide = slices(0.7835, 0.843, 40, 2.1);
      const narrow = slices(0.3, 1.5, 30, 0.1);
      const first = sliceCorrelations(p, wide);
      const oneSet = keptSliceSumsBytes(p);
      // each of the set's nodes keeps a 40 x 40 matrix of 8-byte numbers
      expect(oneSet % (40 * 40 * 8)).toBe(0);
      expect(oneSet).toBeGreaterThan(0);
      sliceCorrelations(p, narrow);
      // the first set was dropped: what is kept is what the second set alone keeps
      const alone = { ...power };
      sliceCorrelations(alone, narrow);
      expect(keptSliceSumsBytes(alone) % (30 * 30 * 8)).toBe(0);
      expect(keptSliceSumsBytes(p)).toBe(keptSliceSumsBytes(alone));
      // made again, the same numbers bit for bit, and the same as a process that kept everything
      expect(sliceCorrelations(p, wide)).toEqual(first);
      keptSliceSums.limitBytes = limit;
      const q = { ...power };
      expect(sliceCorrelations(q, wide)).toEqual(first);
      sliceCorrelations(q, narrow);
      expect(keptSliceSumsBytes(q)).toBe(oneSet + keptSliceSumsBytes(alone));
    } finally {
      keptSliceSums.limitBytes = limit;
    }
  });

  it('up to 16 slices the pair-by-pair sums only (the samples numbers unchanged)', () => {
    const boxes = slices(0.8, 1.8, 16, 2);
    expect(sliceCorrelations({ ...power }, boxes)).toEqual(sliceCorrelations({ ...power }, boxes, { method: 'pairs' }));
  });
});
