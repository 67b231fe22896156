/**
 * The optimiser and the likelihoods it maximises.
 * - closed forms: a concave quadratic is maximised in one Newton step; Rosenbrock's function from
 *   the standard start (-1.2, 1) (Moré, Garbow & Hillstrom 1981, ACM TOMS 7, 17, problem 1) reaches
 *   its maximum of -f at (1, 1) (1e-8);
 * - consistency: the analytic gradients and Hessians of the extended (with and without cosmic-variance
 *   nuisances) and STY log-likelihoods agree with central finite differences (1e-5 relative).
 */
import { describe, expect, test } from 'vitest';
import { maximise, type Evaluation } from '../../src/forecast/optimise.js';
import { extendedLogLikelihood, styLogLikelihood } from '../../src/forecast/fit.js';
import { priorFactorOf } from '../../src/forecast/fisher.js';
import { buildDensityGrid } from '../../src/forecast/grid.js';
import { buildSamplingTables, CatalogueSampler } from '../../src/forecast/sampler.js';
import { FlatCosmology } from '../../src/cosmology/flat-cosmology.js';
import mt19937 from '@stdlib/random-base-mt19937';
import { readFileSync } from 'node:fs';
import { surveyFromSpec, type SurveySpec } from './helpers.js';

describe('maximise (closed forms)', () => {
  test('concave quadratic: one step to the exact maximum', () => {
    const a = [
      [-4, 1],
      [1, -3],
    ];
    const b = [1, 2];
    const f = (x: readonly number[]): Evaluation => ({
      value:
        0.5 * (a[0]![0]! * x[0]! ** 2 + 2 * a[0]![1]! * x[0]! * x[1]! + a[1]![1]! * x[1]! ** 2) +
        b[0]! * x[0]! +
        b[1]! * x[1]!,
      gradient: [a[0]![0]! * x[0]! + a[0]![1]! * x[1]! + b[0]!, a[1]![0]! * x[0]! + a[1]![1]! * x[1]! + b[1]!],
      hessian: a,
    });
    const r = maximise(f, [10, -7]);
    // maximum at x = -A^-1 b: A^-1 = [[-3, -1], [-1, -4]] / 11 -> x = (5/11, 9/11)
    expect(r.converged).toBe(true);
    expect(Math.abs(r.x[0]! - 5 / 11)).toBeLessThan(1e-12);
    expect(Math.abs(r.x[1]! - 9 / 11)).toBeLessThan(1e-12);
    expect(r.iterations).toBeLessThanOrEqual(2);
  });

  test('Rosenbrock from (-1.2, 1) (More, Garbow & Hillstrom 1981): maximum of -f at (1, 1) to 1e-8', () => {
    const f = (x: readonly number[]): Evaluation => {
      const [p, q] = x as [number, number];
      return {
        value: -(100 * (q - p * p) ** 2 + (1 - p) ** 2),
        gradient: [-(-400 * p * (q - p * p) - 2 * (1 - p)), -(200 * (q - p * p))],
        hessian: [
          [-(1200 * p * p - 400 * q + 2), 400 * p],
          [400 * p, -200],
        ],
      };
    };
    const r = maximise(f, [-1.2, 1], { tol: 1e-20 });
    expect(r.converged).toBe(true);
    expect(Math.abs(r.x[0]! - 1)).toBeLessThan(1e-8);
    expect(Math.abs(r.x[1]! - 1)).toBeLessThan(1e-8);
  });

  test('a function without a maximum is reported as not converged', () => {
    const f = (x: readonly number[]): Evaluation => ({ value: x[0]!, gradient: [1], hessian: [[0]] });
    expect(maximise(f, [0], { maxIter: 30 }).converged).toBe(false);
  });
});

const ref = JSON.parse(readFileSync(new URL('../reference/fisher.json', import.meta.url), 'utf8')) as {
  cases: { survey: SurveySpec }[];
};

describe('likelihood derivatives against central differences (consistency, 1e-5 relative)', () => {
  test.each(ref.cases.map((c) => [c.survey.name, c.survey] as const))('%s', (_n, spec) => {
    const survey = surveyFromSpec({ ...spec, area_deg2: spec.area_deg2 * 0.05 });
    const grid = buildDensityGrid(
      survey,
      survey.populations[0]!,
      new FlatCosmology(survey.cosmology),
      survey.sliceEdges,
    );
    const sampler = new CatalogueSampler(grid, buildSamplingTables(grid));
    const rng = mt19937.factory({ seed: 42 }) as unknown as { normalized: () => number };
    const stats = sampler.draw(
      Array.from(buildSamplingTables(grid).sliceExpected, (x) => Math.round(x)),
      rng.normalized,
    );
    const cv = grid.edges.slice(1).map((_, i) => 0.05 + 0.03 * i);
    const noCv = cv.map(() => 0);
    const th = [0.03, -0.02, 0.04];
    const check = (fn: (x: readonly number[]) => Evaluation, x0: number[]) => {
      const e = fn(x0);
      const h = 1e-5;
      for (let j = 0; j < x0.length; j++) {
        const xp = [...x0];
        const xm = [...x0];
        xp[j]! += h;
        xm[j]! -= h;
        const ep = fn(xp);
        const em = fn(xm);
        const g = (ep.value - em.value) / (2 * h);
        expect(Math.abs(e.gradient[j]! - g)).toBeLessThan(1e-5 * Math.max(1, Math.abs(g)) + 1e-6 * Math.abs(e.value));
        for (let k = 0; k < x0.length; k++) {
          const hk = (ep.gradient[k]! - em.gradient[k]!) / (2 * h);
          const scale = Math.sqrt(Math.abs(e.hessian[j]![j]! * e.hessian[k]![k]!));
          expect(Math.abs(e.hessian[j]![k]! - hk)).toBeLessThan(1e-5 * scale);
        }
      }
    };
    check((x) => extendedLogLikelihood(grid, stats, noCv, x), th);
    check((x) => extendedLogLikelihood(grid, stats, cv, x), th);
    // the joint prior of correlated slices (an invented correlation 0.4^|i - j|)
    const correlation = cv.map((_, i) => cv.map((_, j) => 0.4 ** Math.abs(i - j)));
    const joint = priorFactorOf({ fractions: cv, correlation });
    check((x) => extendedLogLikelihood(grid, stats, cv, x, undefined, joint), th);
    // with the identity for the correlation it is the per-slice closed form (to 1e-9 relative)
    const independent = priorFactorOf({ fractions: cv, correlation: cv.map((_, i) => cv.map((_, j) => +(i === j))) });
    const a = extendedLogLikelihood(grid, stats, cv, th, undefined, independent);
    const b = extendedLogLikelihood(grid, stats, cv, th);
    expect(Math.abs(a.value - b.value)).toBeLessThan(1e-9 * Math.abs(b.value));
    for (let j = 0; j < 3; j++) {
      expect(Math.abs(a.gradient[j]! - b.gradient[j]!)).toBeLessThan(1e-9 * Math.abs(b.hessian[j]![j]!));
      for (let k = 0; k < 3; k++)
        expect(Math.abs(a.hessian[j]![k]! - b.hessian[j]![k]!)).toBeLessThan(
          1e-9 * Math.sqrt(Math.abs(b.hessian[j]![j]! * b.hessian[k]![k]!)),
        );
    }
    check((x) => styLogLikelihood(grid, stats, x), th.slice(1));
  });
});
