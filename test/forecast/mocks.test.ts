/**
 * Mock surveys against the Fisher forecast, and their reproducibility.
 *
 * Statistical tests (fixed seeds, so they are deterministic; the false-alarm rates below are what a
 * random seed would give):
 * - Mock standard deviations agree with Fisher sigmas within 21 % (Cramer-Rao: the maximum-likelihood
 *   estimator's covariance tends to the inverse Fisher matrix for many sources; common practice).
 *   With M = 200 mocks the relative standard error of a standard deviation is 1/sqrt(2(M-1)) = 5.01 %,
 *   so 21 % is 4.19 standard errors: false-alarm rate 2.8e-5 per comparison (two-sided normal), 3.3e-4
 *   for the 12 comparisons below. (400 mocks gave 15 % at the same rate, for twice the time.)
 * - No significant bias: |mean - input| < 4 standard errors of the mean (false-alarm rate 6.3e-5 per
 *   comparison, 7.6e-4 for the 11). The maximum-likelihood bias is of order 1/N, about 0.1 sigma here
 *   (1.4 standard errors of the mean of 200 mocks). The normalisation with cosmic-variance nuisances
 *   is biased at second order in the fractions (0.28-0.35 here): there |bias| < sigma / 2.
 * - The sampler draws from the tabulated density (its table against the rejection sampler:
 *   sampler.test.ts): the sample means of ln u and u over 2e5 draws agree
 *   with their quadrature expectations within 4 standard errors (6.3e-5 each).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import mt19937 from '@stdlib/random-base-mt19937';
import { FlatCosmology } from '../../src/cosmology/flat-cosmology.js';
import { buildDensityGrid } from '../../src/forecast/grid.js';
import { fisherParts } from '../../src/forecast/fisher.js';
import { buildSamplingTables, CatalogueSampler } from '../../src/forecast/sampler.js';
import { forecast } from '../../src/forecast/forecast.js';
import { WORKER_MIN_MS_VARIABLE } from '../../src/parallel/blocks.js';
import { surveyFromSpec, type SurveySpec } from './helpers.js';

const ref = JSON.parse(readFileSync(new URL('../reference/fisher.json', import.meta.url), 'utf8')) as {
  cases: { survey: SurveySpec }[];
};
const spec = (name: string) => ref.cases.find((c) => c.survey.name === name)!.survey;

/** The invented survey scaled in area to about `n` expected sources. */
function withCount(s: SurveySpec, n: number): SurveySpec {
  const sv = surveyFromSpec(s);
  const grid = buildDensityGrid(sv, sv.populations[0]!, new FlatCosmology(sv.cosmology), sv.sliceEdges);
  return { ...s, area_deg2: (s.area_deg2 * n) / fisherParts(grid).count };
}

describe('sampler draws from the tabulated density', () => {
  test.each(ref.cases.map((c) => [c.survey.name, c.survey] as const))(
    '%s: mean ln u and mean u within 4 standard errors',
    (_n, s) => {
      const survey = surveyFromSpec(s);
      const grid = buildDensityGrid(
        survey,
        survey.populations[0]!,
        new FlatCosmology(survey.cosmology),
        survey.sliceEdges,
      );
      const tables = buildSamplingTables(grid);
      // expectations from the quadrature
      let w = 0,
        wt = 0,
        wt2 = 0,
        wu = 0,
        wu2 = 0;
      for (let q = 0; q < grid.pointT.length; q++) {
        const g = Math.exp(grid.pointLogW[q]! + grid.pointA1[q]! * grid.pointT[q]! - grid.pointExpT[q]!);
        const t = grid.pointT[q]!;
        const u = grid.pointExpT[q]!;
        w += g;
        wt += g * t;
        wt2 += g * t * t;
        wu += g * u;
        wu2 += g * u * u;
      }
      const n = 200_000;
      // split the draws over slices in proportion to their expected counts
      const counts = Array.from(tables.sliceExpected, (x) => Math.round((n * x) / w));
      const total = counts.reduce((a, b) => a + b, 0);
      const rng = mt19937.factory({ seed: 2024 }) as unknown as { normalized: () => number };
      const sampler = new CatalogueSampler(grid, tables);
      const st = sampler.draw(counts, rng.normalized);
      // expectation for the rounded allocation
      const meanT = wt / w;
      const meanU = wu / w;
      const seT = Math.sqrt((wt2 / w - meanT ** 2) / total);
      const seU = Math.sqrt((wu2 / w - meanU ** 2) / total);
      expect(st.total).toBe(total);
      expect(Math.abs(st.sumT / total - meanT)).toBeLessThan(4 * seT);
      expect(Math.abs(st.sumU / total - meanU)).toBeLessThan(4 * seU);
    },
  );
});

const FRACTIONS = (s: SurveySpec) => () => s.cosmic_variance!;

describe('mock standard deviations agree with Fisher sigmas (21 %) and fits are unbiased (4 s.e.m.): 200 mocks of about 5000 sources', () => {
  const cases: [string, SurveySpec, boolean][] = [
    ['line_flux, hard limit, Poisson only', withCount(spec('line_flux_hard_limit'), 5000), false],
    ['line_flux, logistic completeness, Poisson only', withCount(spec('line_flux_logistic_completeness'), 5000), false],
    ['threshold, Poisson only', withCount(spec('threshold_mass'), 5000), false],
    [
      'magnitude, evolving alpha, with cosmic-variance nuisances',
      withCount(spec('magnitude_evolving_alpha'), 5000),
      true,
    ],
  ];
  test.each(cases)('%s', async (_n, s, cv) => {
    const survey = surveyFromSpec(s);
    const f = await forecast(survey, {
      mocks: 200,
      seed: 11,
      workers: 2,
      cosmicVariance: cv,
      ...(cv ? { cosmicVarianceSource: FRACTIONS(s) } : {}),
    });
    const m = f.mocks!;
    expect(m.failed_fits).toBe(0);
    // With cosmic variance the fitted normalisation is biased high at second order in the fractions
    // (DEVELOPERS.md, "Forecasts": about a quarter of sigma, i.e. about 3.5 standard errors of the mean
    // with 200 mocks): its note may appear and its bias is bounded by half a sigma instead.
    const secondOrder = (name: string) => cv && name === 'log10_phi_star';
    expect(
      m.notes.filter(
        (n) => !(cv && n.startsWith('log10_phi_star: ') && n.includes('with cosmic variance this is expected')),
      ),
    ).toEqual([]);
    for (const name of f.parameters) {
      const p = m.parameters[name]!;
      const ratio = p.std / f.fisher.sigma[name]!;
      expect(ratio, `${name}: mock std / Fisher sigma = ${ratio}`).toBeGreaterThan(0.79);
      expect(ratio, `${name}: mock std / Fisher sigma = ${ratio}`).toBeLessThan(1.21);
      if (secondOrder(name))
        expect(Math.abs(p.bias), `${name}: bias ${p.bias}`).toBeLessThan(0.5 * f.fisher.sigma[name]!);
      else expect(Math.abs(p.bias_in_standard_errors), `${name}: bias ${p.bias}`).toBeLessThan(4);
      expect(p.p16).toBeLessThan(p.p50);
      expect(p.p50).toBeLessThan(p.p84);
    }
    if (cv) {
      // cosmic variance must widen the normalisation's sigma here (fractions 0.28-0.35 with 5000 sources)
      expect(f.fisher.sigma.log10_phi_star! / f.fisher_poisson_only.sigma.log10_phi_star!).toBeGreaterThan(1.2);
    }
  });

  test('sty estimator: log10_phi_star is not constrained and not reported; the shape parameters are', async () => {
    const f = await forecast(surveyFromSpec(withCount(spec('threshold_mass'), 3000)), {
      mocks: 60,
      seed: 3,
      cosmicVariance: false,
      estimator: 'sty',
    });
    expect(f.mocks!.estimator).toBe('sty');
    expect(f.mocks!.not_constrained).toEqual(['log10_phi_star']);
    expect(Object.keys(f.mocks!.parameters).sort()).toEqual(['alpha', 'log10_l_star']);
    expect(f.mocks!.notes.join(' ')).toMatch(/does not constrain phi\*/);
  });
});

describe('reproducibility', () => {
  const s = withCount(spec('magnitude_evolving_alpha'), 2000);
  const opts = { mocks: 37, seed: 123456789, cosmicVariance: true, cosmicVarianceSource: FRACTIONS(s) };
  test('same seed, same JSON with 1 and 2 workers, below and above the break-even (exact equality)', async () => {
    const a = await forecast(surveyFromSpec(s), { ...opts, workers: 1 });
    const given = process.env[WORKER_MIN_MS_VARIABLE];
    try {
      // 0: two real threads whatever the work; 1e9: far below the break-even, every mock here
      for (const minMs of ['0', '1e9']) {
        process.env[WORKER_MIN_MS_VARIABLE] = minMs;
        const b = await forecast(surveyFromSpec(s), { ...opts, workers: 2 });
        expect(JSON.stringify(b), minMs).toBe(JSON.stringify(a));
      }
    } finally {
      if (given === undefined) delete process.env[WORKER_MIN_MS_VARIABLE];
      else process.env[WORKER_MIN_MS_VARIABLE] = given;
    }
  });
  test('a different seed gives different mocks', async () => {
    const a = await forecast(surveyFromSpec(s), { ...opts, mocks: 5 });
    const b = await forecast(surveyFromSpec(s), { ...opts, mocks: 5, seed: 7 });
    expect(a.mocks!.parameters.alpha!.mean).not.toBe(b.mocks!.parameters.alpha!.mean);
  });
});

describe('mock fits of few sources: the small-sample bias of a maximum-likelihood fit is named', () => {
  test('at about 60 sources per mock the alpha offset beyond 4 standard errors carries its reason, and shrinks at 150 (failed before: the note gave no reason)', async () => {
    const s = spec('magnitude_evolving_alpha');
    const run = async (n: number) =>
      (await forecast(surveyFromSpec(withCount(s, n)), { mocks: 400, seed: 11, workers: 1, cosmicVariance: false }))
        .mocks!;
    const few = await run(60);
    const note = few.notes.find((n) => n.startsWith('alpha: '));
    expect(note, few.notes.join(' | ')).toBeDefined();
    // the ML estimator's bias is of order 1/N (Cox & Snell 1968; common practice)
    expect(note).toMatch(
      /with about 6\d sources per mock this is expected: a maximum-likelihood fit of few sources is biased at the order of 1\/N/,
    );
    const more = await run(150);
    expect(Math.abs(more.parameters.alpha!.bias)).toBeLessThan(Math.abs(few.parameters.alpha!.bias));
  });
});
