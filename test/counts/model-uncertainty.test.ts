/**
 * predict under a population's model_uncertainty against the independent Monte Carlo and the exact
 * results of test/reference/generate/model_uncertainty.py (test/reference/model_uncertainty.json;
 * numpy draws, scipy/mpmath counts). Tolerances: a Monte Carlo percentile is allowed 4 standard
 * errors, sqrt(se_reference^2 + se_1000^2 x 1000 / N) as the fixture's header says (se from the
 * order statistics); exact references (draws files, one parameter alone, correlation +-1) the
 * engine's own accuracy (1e-8 relative) or, for our N draws, 4 x se_1000 x sqrt(1000 / N).
 *
 * Where only the counts' percentiles are checked, predict runs with `model: {counts: true}` (the
 * counts' model blocks bit for bit those of the full run: checked below) or the draws are taken
 * from populationDraws directly (their percentiles bit for bit predict's: checked below).
 */
import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { parse } from 'yaml';
import { parseSurveyObject, loadSurveyFile } from '../../src/survey/index.js';
import { predict } from '../../src/counts/predict.js';
import { errorOf } from '../support/survey-error.js';
import type { ModelSpread } from '../../src/model/outputs/prediction.js';
import { drawModelOffsets, percentilesOf, populationDraws } from '../../src/counts/model-draws.js';
import { modelSpread } from '../../src/counts/model-spread.js';
import { countPopulation } from '../../src/counts/engine.js';
import { FlatCosmology } from '../../src/cosmology/flat-cosmology.js';

const DIR = 'test/reference/surveys-model';
const REF = JSON.parse(readFileSync('test/reference/model_uncertainty.json', 'utf8')) as Reference;
const KEYS = ['p2_5', 'p16', 'p50', 'p84', 'p97_5'] as const;
type Key = (typeof KEYS)[number];
type Pct = Record<Key, number> & {
  fraction: number;
  standard_error?: Record<Key, number>;
  se_1000?: Record<Key, number>;
};
interface Case {
  file: string;
  yaml: string;
  plain: { slices: number[]; total: number };
  model: { slices: Pct[]; total: Pct; draws: number | string };
  one_parameter?: {
    parameter: string;
    sigma: number;
    slices: Pct[];
    total: Pct & { mean: number; variance: number };
  }[];
}
interface Reference {
  surveys: Case[];
  correlation_limits: {
    file: string;
    rows: { parameters: string[]; sigmas: number[]; correlation: number; slices: Pct[]; total: Pct }[];
  }[];
}

const caseOf = (file: string) => REF.surveys.find((c) => c.file === file)!;

/** The reference file's survey with its model_uncertainty block replaced. */
function withUncertainty(file: string, block: Record<string, unknown>) {
  const obj = parse(caseOf(file).yaml) as { population: Record<string, unknown> };
  obj.population.model_uncertainty = block;
  return parseSurveyObject(obj, join(DIR, file));
}

function expectWithin(got: ModelSpread, ref: Pct, draws: number, label: string) {
  for (const k of KEYS) {
    const se = Math.hypot(ref.standard_error?.[k] ?? 0, (ref.se_1000?.[k] ?? 0) * Math.sqrt(1000 / draws));
    expect(Math.abs(got[k] - ref[k]), `${label} ${k}: ${got[k]} vs ${ref[k]} (se ${se})`).toBeLessThanOrEqual(4 * se);
  }
}

describe('percentiles against the independent Monte Carlo (40,000 numpy draws)', () => {
  test.each(['line-correlated.yaml', 'uv-magnitude.yaml', 'double-schechter-mass.yaml'])('%s, 1000 draws', (file) => {
    const c = caseOf(file);
    // the counts' model blocks only (the same numbers as the full run: 'predict's model blocks' below)
    const p = predict(loadSurveyFile(join(DIR, file)), { model: { counts: true } });
    if (p.breakdown !== 'redshift') throw new Error('one population');
    // the plain prediction first (the reference's Gauss-Legendre counts, checked by it against quad to 1e-10)
    p.slices.forEach((s, j) => expect(Math.abs(s.count / c.plain.slices[j]! - 1)).toBeLessThan(1e-8));
    expect(p.totals.model!.draws).toBe(1000);
    p.slices.forEach((s, j) => expectWithin(s.model!, c.model.slices[j]!, 1000, `${file} slice ${j}`));
    expectWithin(p.totals.model!, c.model.total, 1000, `${file} total`);
    const t = p.totals.model!;
    expect(t.fraction).toBeCloseTo((t.p84 - t.p16) / (2 * t.p50), 14);
  });
});

describe('exact cases', () => {
  test('a draws file: every row once, type-7 percentiles as numpy (exact reference, 1e-8)', () => {
    const c = caseOf('narrowband-draws-file.yaml');
    const p = predict(loadSurveyFile(join(DIR, c.file)), { model: { counts: true } });
    if (p.breakdown !== 'redshift') throw new Error('one population');
    expect(p.totals.model!.draws).toBe(800); // the rows, each once
    [...p.slices.map((s) => s.model!), p.totals.model!].forEach((m, j) => {
      const r = j < p.slices.length ? c.model.slices[j]! : c.model.total;
      for (const k of KEYS) expect(Math.abs(m[k] / r[k] - 1), `${j} ${k}`).toBeLessThan(1e-8);
    });
  });

  test('a count of draws is refused where nothing would be drawn that many times, as predict --draws is (failed before: silently ignored)', () => {
    const rows = loadSurveyFile(join(DIR, 'narrowband-draws-file.yaml'));
    expect(errorOf(() => predict(rows, { model: { draws: 5 } })).message).toMatch(
      /model\.draws: every population's model_uncertainty is a draws_file, whose rows are each drawn once.*; leave out model\.draws/,
    );
    const plain = loadSurveyFile('samples/halpha-narrowband.yaml');
    expect(errorOf(() => predict(plain, { model: { draws: 5 } })).message).toMatch(
      /model\.draws: no population has a model_uncertainty block.*; add model_uncertainty to a population/,
    );
    // draws: 0 (no draws) stays allowed everywhere, and the plain file predicts as without it
    expect(predict(plain, { model: { draws: 0 } }).totals.count).toBe(predict(plain).totals.count);
  });

  test('a draws file of one row at the assumed values reproduces the plain prediction (1e-12)', () => {
    const p = predict(loadSurveyFile(join(DIR, 'narrowband-draws-assumed.yaml')));
    if (p.breakdown !== 'redshift') throw new Error('one population');
    for (const s of [...p.slices, p.totals]) {
      expect(s.model!.draws).toBe(1);
      for (const k of KEYS) expect(Math.abs(s.model![k] / s.count - 1)).toBeLessThan(1e-12);
    }
  });

  test('zero sigmas: every percentile is the plain prediction exactly, fraction 0', () => {
    const c = caseOf('line-zero-sigmas.yaml');
    const p = predict(loadSurveyFile(join(DIR, c.file)), { model: { draws: 50 } });
    if (p.breakdown !== 'redshift') throw new Error('one population');
    for (const s of [...p.slices, p.totals]) {
      for (const k of KEYS) expect(s.model![k]).toBe(s.count);
      expect(s.model!.fraction).toBe(0);
      for (const [i, v] of s === p.totals ? [] : (s as (typeof p.slices)[number]).histogram.model!.p16.entries()) {
        expect(v).toBe((s as (typeof p.slices)[number]).histogram.counts[i]);
      }
    }
    expect(p.totals.luminosity_density!.model!.detected.p50).toBe(p.totals.luminosity_density!.detected);
  });

  const DRAWS = 4000;
  const oneParameter = caseOf('line-correlated.yaml').one_parameter!.concat(
    caseOf('uv-magnitude.yaml').one_parameter!.map((r) => ({ ...r, file: 'uv-magnitude.yaml' })),
  );

  /** The counts of each draw (one survey, one population) and their totals, summed as predict sums them. */
  function drawsOf(survey: ReturnType<typeof withUncertainty>, draws: number, seed: number) {
    const pop = survey.populations[0]!;
    const cosmo = new FlatCosmology(survey.cosmology);
    const own = countPopulation(survey, pop, cosmo, pop.sliceEdges, { drawNodes: true });
    const d = populationDraws(survey, pop, cosmo, own, drawModelOffsets(pop.modelUncertainty!, 1, draws, seed, 0), {
      luminosity: false,
      histogramDraws: 0,
    });
    const totals = new Float64Array(draws);
    for (const c of d.counts) for (let i = 0; i < draws; i++) totals[i]! += c[i]!;
    return { counts: d.counts, totals };
  }

  test("predict's model blocks are the percentiles of populationDraws (bit for bit, with and without counts: true)", () => {
    // the two surveys of the one-parameter cases (hard limits), with the parameters alpha and M*
    for (const [file, r, draws] of [
      ['line-correlated.yaml', oneParameter[2]!, 120],
      ['uv-magnitude.yaml', oneParameter[4]!, 120],
    ] as const) {
      const survey = withUncertainty(file, { [r.parameter]: r.sigma });
      const d = drawsOf(survey, draws, 7);
      const want = {
        slices: d.counts.map((c) => modelSpread(c)),
        total: modelSpread(d.totals),
      };
      for (const counts of [false, true]) {
        const p = predict(survey, { model: { draws, seed: 7, counts } });
        if (p.breakdown !== 'redshift') throw new Error('one population');
        expect({ slices: p.slices.map((s) => s.model), total: p.totals.model }, `${file} ${draws} ${counts}`).toEqual(
          want,
        );
      }
    }
  });

  test.each(oneParameter.map((r) => [(r as { file?: string }).file ?? 'line-correlated.yaml', r] as const))(
    'one parameter alone (%s): exact percentiles and the Gauss-Hermite mean',
    (file, r) => {
      // the draws predict makes (seed 7; the same percentiles: the test above), taken once
      const d = drawsOf(withUncertainty(file, { [r.parameter]: r.sigma }), DRAWS, 7);
      const t = modelSpread(d.totals);
      expect(t.draws).toBe(DRAWS);
      // the mean of the same draws against 40-node Gauss-Hermite quadrature: 4 standard errors sqrt(variance / N)
      let mean = 0;
      for (let i = 0; i < DRAWS; i++) for (const c of d.counts) mean += c[i]! / DRAWS;
      expect(Math.abs(mean - r.total.mean)).toBeLessThanOrEqual(4 * Math.sqrt(r.total.variance / DRAWS));
      for (const k of KEYS) {
        const se = r.total.se_1000![k] * Math.sqrt(1000 / DRAWS);
        expect(Math.abs(t[k] - r.total[k]), `${r.parameter} ${k}`).toBeLessThanOrEqual(4 * se);
      }
    },
  );

  test.each(REF.correlation_limits.flatMap((c) => c.rows.map((r) => [c.file, r.correlation, r] as const)))(
    'correlation limit %s %d',
    (file, rho, r) => {
      // rho = +-(1 - 1e-9): positive definite, within far less than any Monte Carlo error of +-1
      const block = {
        [r.parameters[0]!]: r.sigmas[0],
        [r.parameters[1]!]: r.sigmas[1],
        correlation: { [`${r.parameters[0]}-${r.parameters[1]}`]: rho * (1 - 1e-9) },
      };
      const p = predict(withUncertainty(file, block), { model: { draws: DRAWS, seed: 3, counts: true } });
      const t = p.totals.model!;
      for (const k of KEYS) {
        const se = r.total.se_1000![k] * Math.sqrt(1000 / DRAWS);
        expect(Math.abs(t[k] - r.total[k]), `${k}`).toBeLessThanOrEqual(4 * se);
      }
    },
  );
});

describe('determinism and properties', () => {
  const file = join(DIR, 'line-correlated.yaml');
  test('the same seed gives bit-identical output; another seed other draws', () => {
    const a = JSON.stringify(predict(loadSurveyFile(file), { model: { draws: 200, seed: 11 } }));
    const b = JSON.stringify(predict(loadSurveyFile(file), { model: { draws: 200, seed: 11 } }));
    const c = JSON.stringify(predict(loadSurveyFile(file), { model: { draws: 200, seed: 12 } }));
    expect(a).toBe(b);
    expect(c).not.toBe(a);
  });

  test('type-7 percentiles as numpy.percentile (worked by hand)', () => {
    // numpy.percentile([1, 2, 3, 4], [25, 50, 84]) = [1.75, 2.5, 3.52]
    expect(percentilesOf([4, 1, 3, 2], [0.25, 0.5, 0.84])).toEqual([1.75, 2.5, expect.closeTo(3.52, 14)]);
  });

  test('percentiles ordered, finite, and linear in the area (fast-check)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0, max: 0.3, noNaN: true }),
        fc.double({ min: 0, max: 0.2, noNaN: true }),
        fc.double({ min: 0, max: 0.3, noNaN: true }),
        fc.double({ min: -0.9, max: 0.9, noNaN: true }),
        fc.double({ min: 0.01, max: 50, noNaN: true }),
        (sp, sl, sa, rho, area) => {
          const block = {
            log10_phi_star: sp,
            log10_l_star: sl,
            alpha: sa,
            correlation: { 'log10_phi_star-alpha': rho },
          };
          const obj = parse(caseOf('line-correlated.yaml').yaml) as Record<string, Record<string, unknown>>;
          obj.population!.model_uncertainty = block;
          const model = { draws: 40, seed: 5, counts: true };
          const one = predict(parseSurveyObject({ ...obj, area: 1 }, file), { model });
          const big = predict(parseSurveyObject({ ...obj, area }, file), { model });
          const m = one.totals.model!;
          const n = big.totals.model!;
          const v = KEYS.map((k) => m[k]);
          v.forEach((x, i) => {
            expect(Number.isFinite(x)).toBe(true);
            if (i > 0) expect(x).toBeGreaterThanOrEqual(v[i - 1]!);
          });
          for (const k of KEYS) expect(Math.abs(n[k] / (area * m[k]) - 1)).toBeLessThan(1e-9);
        },
      ),
      { numRuns: 8, seed: 4 },
    );
  });
});

describe('a draw counts as the engine does at the same offsets (hard limits, completeness table and logistic)', () => {
  const cases: [string, string][] = [
    ['line-correlated.yaml', join(DIR, 'line-correlated.yaml')],
    ['samples/deep-continuum.yaml (completeness table)', 'samples/deep-continuum.yaml'],
    ['double-schechter-mass.yaml', join(DIR, 'double-schechter-mass.yaml')],
  ];
  test.each(cases)('%s', (_name, file) => {
    const text = readFileSync(file, 'utf8');
    const obj = parse(text) as { detection: Record<string, unknown>; slices: unknown };
    const variants = [obj];
    if (file.includes('deep-continuum')) {
      // the same field with a logistic completeness, two slices (keeps the test short)
      variants.push({
        ...obj,
        detection: { ...obj.detection, completeness: { model: 'logistic', half: 28.9, width: 0.2 } },
        slices: { count: 2 },
      });
      variants[0] = { ...obj, slices: { count: 2 } };
    }
    for (const v of variants) {
      const survey = parseSurveyObject(v, file);
      const pop = survey.populations[0]!;
      const cosmo = new FlatCosmology(survey.cosmology);
      const own = countPopulation(survey, pop, cosmo, pop.sliceEdges, { drawNodes: true });
      const k = pop.components.length;
      const o = {
        log10PhiStar: new Array<number>(k).fill(0.07),
        alpha: new Array<number>(k).fill(-0.06),
        characteristic: pop.variable === 'luminosity' ? 0.05 : -0.12,
      };
      const d = populationDraws(survey, pop, cosmo, own, [o], { luminosity: true, histogramDraws: 1 });
      const engine = countPopulation(survey, pop, cosmo, pop.sliceEdges, {
        offsets: { log10PhiStar: 0.07, alpha: -0.06, characteristic: o.characteristic },
      });
      // The engine places its redshift nodes for the parameters it counts (converged to 1e-8 of
      // each piece); a draw keeps the plain prediction's. With a limit fixed in obs both sets agree
      // to 1e-9; a threshold limit tabulated in z cuts the pieces where it crosses bin edges, which
      // move with L*: 2e-7 there.
      const tol = survey.detection.kind === 'threshold' ? 2e-7 : 1e-9;
      engine.forEach((sl, j) => {
        expect(Math.abs(d.counts[j]![0]! / sl.count - 1), 'count').toBeLessThan(tol);
        expect(Math.abs(d.luminosity!.detected[j]![0]! / sl.luminosity!.detected - 1)).toBeLessThan(tol);
        // the histogram on the plain bins (the engine's own grid may start a bin earlier or later)
        const h = d.histograms![j]!;
        const plain = own[j]!.histogram;
        const off =
          Math.round(sl.histogram.edges[0]! / survey.histogramWidth) -
          Math.round(plain.edges[0]! / survey.histogramWidth);
        h.bins.forEach((b, i) => {
          const want = sl.histogram.counts[i - off];
          if (want !== undefined) expect(Math.abs(b[0]! - want) / sl.count, `bin ${i}`).toBeLessThan(tol);
        });
      });
    }
  });
});
