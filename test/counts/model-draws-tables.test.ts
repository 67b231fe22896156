/**
 * The tabulated path of the model's draws where the completeness varies (src/counts/model-draws.ts,
 * SliceTables) and under a hard limit (hardTables) against the exact path (every draw's
 * completeness quadrature or incomplete gamma functions at every node, itself checked against the
 * engine at the same offsets in test/counts/model-uncertainty.test.ts).
 *
 * Tolerance 1e-8 relative on each draw's count and detected luminosity: the tables' Chebyshev
 * tails are held below 1e-10 of the logarithm's scale (an estimate, hence the margin of 100), which
 * is far below the 1e-6 a percentile needs and five orders below the Monte Carlo error of 1,000
 * draws (about 1.25 sigma / sqrt(1000), a few per cent of the band's width). The luminosity of all
 * sources, a series in d_alpha of the closed form (tail below 1e-13 in the logarithm) against the
 * closed form at every node: 1e-12. The histograms of the first HIST_DRAWS
 * draws (src/counts/model-draws-histograms.ts: a series of the slice's Schechter density in obs and
 * one quadrature rule for every draw) to 1e-8 relative in every bin, the faintest 1e-18 of a slice's
 * count included (the series' tail is held below 1e-11 in the logarithm, each panel of the rule
 * below 1e-14; 2e-12 seen), and a bin empty on one path is empty on the other.
 */
import { describe, expect, test } from 'vitest';
import { readFileSync, readdirSync } from 'node:fs';
import { parse } from 'yaml';
import { parseSurveyObject } from '../../src/survey/index.js';
import { FlatCosmology } from '../../src/cosmology/flat-cosmology.js';
import { countPopulation } from '../../src/counts/engine.js';
import { predict } from '../../src/counts/predict.js';
import { CountMemo } from '../../src/counts/count-memo.js';
import {
  drawModelOffsets,
  drawPaths,
  forgetLevel1Series,
  HISTOGRAM_TABLE_MIN_DRAWS,
  histogramPaths,
  level1Paths,
  populationDraws,
  TABLE_MIN_DRAWS,
} from '../../src/counts/model-draws.js';

const DIR = 'test/reference/surveys-model';
const DRAWS = 80;
/** Draws whose histograms are compared (the exact path costs a whole histogram per draw). */
const HIST_DRAWS = 16;

type Obj = Record<string, unknown> & { detection: Record<string, unknown>; population: Record<string, unknown> };
const read = (file: string) => parse(readFileSync(file, 'utf8')) as Obj;
/** Whether the cases compared had a luminosity of all sources (both kinds must be seen). */
const totalsSeen = new Set<boolean>();

function compare(obj: Obj, file: string, expectTabulated: boolean, expectExactDraws = false) {
  // histograms: tabulated where the counts are (a limit tabulated in z under a varying completeness: neither)
  const histTabulated = expectTabulated;
  const survey = parseSurveyObject(obj, file);
  const pop = survey.populations[0]!;
  const cosmo = new FlatCosmology(survey.cosmology);
  const own = countPopulation(survey, pop, cosmo, pop.sliceEdges, { drawNodes: true });
  const offsets = drawModelOffsets(pop.modelUncertainty!, pop.components.length, DRAWS, 3, 0);
  const before = drawPaths.tabulated;
  const histBefore = histogramPaths.tabulated;
  const exactDrawsBefore = histogramPaths.exactDraws;
  const fast = populationDraws(survey, pop, cosmo, own, offsets, { luminosity: true, histogramDraws: HIST_DRAWS });
  const used = drawPaths.tabulated - before;
  const histUsed = histogramPaths.tabulated - histBefore;
  const exactDraws = histogramPaths.exactDraws - exactDrawsBefore;
  if (expectExactDraws) expect(exactDraws, 'draws of tabulated slices on the exact path').toBeGreaterThan(0);
  else expect(exactDraws, 'draws of tabulated slices on the exact path').toBe(0);
  const exact = populationDraws(survey, pop, cosmo, own, offsets, {
    luminosity: true,
    histogramDraws: HIST_DRAWS,
    exact: true,
  });
  const withBins = own.filter((s) => (s.drawNodes?.length ?? 0) > 0 && s.histogram.counts.length > 0).length;
  expect(histUsed, 'slices whose histograms are tabulated').toBe(histTabulated ? withBins : 0);
  // Every bin and draw checked, what differs collected for one expect (the same conditions as an
  // expect per number, without its cost per call)
  const differ: string[] = [];
  let moved = 0;
  exact.histograms!.forEach((h, j) =>
    h.bins.forEach((b, k) => {
      const got = fast.histograms![j]!.bins[k]!;
      if (got.length !== HIST_DRAWS) differ.push(`slice ${j} bin ${k}: ${got.length} draws`);
      b.forEach((v, i) => {
        const g = got[i]!;
        if (v === 0) {
          if (!Object.is(g, 0)) differ.push(`slice ${j} bin ${k} draw ${i}: ${g}, not empty`);
        } else if (!(Math.abs(g / v - 1) < 1e-8)) differ.push(`slice ${j} bin ${k} draw ${i}: ${g}, not ${v}`);
      });
      if (b[0]! > 0) moved = Math.max(moved, Math.max(...b) / Math.min(...b.filter((v) => v > 0)));
    }),
  );
  expect(differ, 'histograms').toEqual([]);
  // the draws do move the bins
  expect(moved).toBeGreaterThan(1.05);
  if (expectTabulated) expect(used, 'slices tabulated').toBe(own.filter((s) => (s.drawNodes?.length ?? 0) > 0).length);
  else expect(used, 'slices tabulated').toBe(0);
  let worst = 0;
  exact.counts.forEach((c, j) =>
    c.forEach((v, i) => {
      const rel = (x: number, y: number) => (y === 0 ? Math.abs(x) : Math.abs(x / y - 1));
      worst = Math.max(worst, rel(fast.counts[j]![i]!, v));
      if (!(rel(fast.counts[j]![i]!, v) < 1e-8)) differ.push(`slice ${j} draw ${i} count: ${fast.counts[j]![i]}`);
      const d = exact.luminosity!.detected[j]![i]!;
      if (!(rel(fast.luminosity!.detected[j]![i]!, d) < 1e-8)) differ.push(`slice ${j} draw ${i} detected`);
      const t = exact.luminosity!.total?.[j]![i];
      if (t !== undefined && !(rel(fast.luminosity!.total![j]![i]!, t) < 1e-12))
        differ.push(`slice ${j} draw ${i} total`);
    }),
  );
  expect(differ, 'counts and luminosities').toEqual([]);
  // the luminosity of all sources is given exactly where every draw of every slice has one: at
  // every node and component alpha + d_alpha > -2 (the closed form's Gamma(alpha + d_alpha + 2)
  // diverges below; common practice), the plain prediction's own for a draw without offsets
  const plainDraw = (o: (typeof offsets)[number]) =>
    o.characteristic === 0 && o.alpha.every((v) => v === 0) && o.log10PhiStar.every((v) => v === 0);
  const everyTotal = own.every((sl) =>
    offsets.every((o) =>
      plainDraw(o) || (sl.drawNodes?.length ?? 0) === 0
        ? sl.luminosity?.total !== undefined
        : sl.drawNodes!.every((nd) => nd.allComponents.every((c, k) => c.alpha + o.alpha[k]! > -2)),
    ),
  );
  expect(fast.luminosity!.total !== undefined, 'the luminosity of all sources given').toBe(everyTotal);
  expect(exact.luminosity!.total !== undefined, 'the luminosity of all sources given (exact path)').toBe(everyTotal);
  totalsSeen.add(everyTotal);
  // the draws do move the counts (the comparison is not of constants)
  const c0 = exact.counts[0]!;
  expect(Math.max(...c0) / Math.min(...c0)).toBeGreaterThan(1.05);
  return worst;
}

describe('tabulated draws equal the exact path (1e-8 relative)', () => {
  test('the tables start at enough draws', () => {
    expect(DRAWS).toBeGreaterThanOrEqual(TABLE_MIN_DRAWS);
    expect(HIST_DRAWS).toBeGreaterThanOrEqual(HISTOGRAM_TABLE_MIN_DRAWS);
  });

  const line = read(`${DIR}/line-correlated.yaml`);
  test('line flux, alpha evolving, completeness table, correlated sigmas', () => {
    const obj = {
      ...line,
      detection: {
        ...line.detection,
        completeness: {
          model: 'table',
          table: [
            [1.5e-16, 0.4],
            [3e-16, 0.8],
            [1e-15, 0.97],
          ],
        },
      },
      slices: { count: 3 },
    };
    compare(obj, `${DIR}/line-correlated.yaml`, true);
  });

  test('line flux, logistic completeness, wide sigmas (0.3 in alpha, 0.25 dex in L*)', () => {
    const obj = {
      ...line,
      detection: { ...line.detection, completeness: { model: 'logistic', half: 2.5e-16, width: 0.15 } },
      population: {
        ...line.population,
        model_uncertainty: {
          log10_phi_star: 0.2,
          log10_l_star: 0.25,
          alpha: 0.3,
          correlation: { 'log10_l_star-alpha': -0.6 },
        },
      },
      slices: { count: 2 },
    };
    compare(obj, `${DIR}/line-correlated.yaml`, true);
  });

  test('a logistic 0.4 dex wide (varying over every bin, the brightest open bin cut at its edge)', () => {
    const obj = {
      ...line,
      detection: { ...line.detection, completeness: { model: 'logistic', half: 2.5e-16, width: 0.4 } },
      slices: { count: 2 },
    };
    compare(obj, `${DIR}/line-correlated.yaml`, true);
  });

  test('a blend ratio falling with z (a table), dust and an observed-frame width cut, logistic completeness', () => {
    const obj = {
      ...line,
      detection: {
        ...line.detection,
        completeness: { model: 'logistic', half: 2.5e-16, width: 0.15 },
        equivalent_width_cut: { observed: 80 },
      },
      population: {
        ...line.population,
        blend_ratio: {
          table: [
            [0.8, 0.35],
            [1.2, 0.3],
            [1.6, 0.15],
          ],
        },
        attenuation: 1.0,
        equivalent_widths: { model: 'lognormal', median: 50, sigma_dex: 0.3 },
      },
      slices: { count: 3 },
    };
    compare(obj, `${DIR}/line-correlated.yaml`, true);
  });

  test('magnitudes (slope -2.5), M* and alpha evolving, logistic completeness', () => {
    const uv = read(`${DIR}/uv-magnitude.yaml`);
    const obj = {
      ...uv,
      detection: { ...uv.detection, completeness: { model: 'logistic', half: 28.5, width: 0.2 } },
      slices: { width: 1.5 },
    };
    compare(obj, `${DIR}/uv-magnitude.yaml`, true);
  });

  test('dropout sample: redshift selection weights and a logistic completeness', () => {
    const obj = read('samples/dropout-field.yaml');
    obj.population = {
      ...obj.population,
      model_uncertainty: { log10_phi_star: 0.1, m_star: 0.15, alpha: 0.1, correlation: { 'm_star-alpha': 0.5 } },
    };
    compare(obj, 'samples/dropout-field.yaml', true);
  });

  // every bundled sample with model_uncertainty (the explore page redraws them on each change):
  // a varying completeness (level 1 and 2) or a hard limit (hardTables)
  const drawn = readdirSync('samples')
    .filter((f) => f.endsWith('.yaml'))
    .filter((f) => read(`samples/${f}`).population?.model_uncertainty !== undefined);
  test('bundled samples have draws under a varying completeness and under a hard limit', () => {
    expect(drawn).toContain('plan-robust-uv-slope.yaml');
    expect(drawn.some((f) => read(`samples/${f}`).detection.completeness === undefined)).toBe(true);
  });
  test.each(drawn)('samples/%s as written', (f) => {
    compare(read(`samples/${f}`), `samples/${f}`, true);
  });

  test('hard limit (no completeness), line flux with a correlated model: tabulated per component', () => {
    const obj = { ...line, detection: { ...line.detection, completeness: undefined }, slices: { count: 3 } };
    delete (obj.detection as Record<string, unknown>).completeness;
    compare(obj, `${DIR}/line-correlated.yaml`, true);
  });

  test('level-1 series kept from a computation at another area give the draws computed afresh, bit for bit', () => {
    const obj = read('samples/plan-robust-uv-slope.yaml');
    const draws = (area: string) => {
      const survey = parseSurveyObject({ ...obj, area }, 'samples/plan-robust-uv-slope.yaml');
      const pop = survey.populations[0]!;
      const cosmo = new FlatCosmology(survey.cosmology);
      const own = countPopulation(survey, pop, cosmo, pop.sliceEdges, { drawNodes: true });
      const offsets = drawModelOffsets(pop.modelUncertainty!, pop.components.length, DRAWS, 5, 0);
      return populationDraws(survey, pop, cosmo, own, offsets, { luminosity: true, histogramDraws: 0 });
    };
    forgetLevel1Series();
    const fresh = draws('80 arcmin^2');
    forgetLevel1Series();
    draws('45 arcmin^2');
    const reused = draws('80 arcmin^2');
    expect(reused.counts).toEqual(fresh.counts);
    expect(reused.luminosity).toEqual(fresh.luminosity);
    // the area does move the counts (the comparison is not of one computation with itself)
    expect(draws('45 arcmin^2').counts[0]![3]! / fresh.counts[0]![3]!).toBeCloseTo(45 / 80, 12);
  });

  test("level-1 series moved from another limit (an explore page's limit control) equal the exact path and series made afresh", () => {
    const obj = read('samples/plan-robust-uv-slope.yaml');
    const draws = (limit: number, exact = false) => {
      const survey = parseSurveyObject(
        { ...obj, detection: { ...obj.detection, limit } },
        'samples/plan-robust-uv-slope.yaml',
      );
      const pop = survey.populations[0]!;
      const cosmo = new FlatCosmology(survey.cosmology);
      const own = countPopulation(survey, pop, cosmo, pop.sliceEdges, { drawNodes: true });
      const offsets = drawModelOffsets(pop.modelUncertainty!, pop.components.length, DRAWS, 5, 0);
      return populationDraws(survey, pop, cosmo, own, offsets, {
        luminosity: true,
        histogramDraws: 0,
        exact,
        moveAcrossLimits: true,
      });
    };
    const worst = (a: Float64Array[], b: Float64Array[]) =>
      Math.max(...a.map((x, j) => Math.max(...x.map((v, i) => Math.abs(v / b[j]![i]! - 1)))));
    forgetLevel1Series();
    const first = draws(29.0);
    // fainter, brighter, a small step: each slice's level 1 moved, not made afresh
    let last = first;
    for (const limit of [29.3, 28.7, 28.72]) {
      const moved = level1Paths.moved;
      const afresh = level1Paths.afresh;
      last = draws(limit);
      expect(level1Paths.moved - moved, `limit ${limit}: slices moved`).toBe(last.counts.length);
      expect(level1Paths.afresh - afresh).toBe(0);
      const exact = draws(limit, true);
      expect(worst(last.counts, exact.counts), `limit ${limit}: counts`).toBeLessThan(1e-8);
      expect(worst(last.luminosity!.detected, exact.luminosity!.detected)).toBeLessThan(1e-8);
    }
    forgetLevel1Series();
    const fresh = draws(28.72);
    // the moves' error: the completeness rules' on each strip (about 1e-14 seen)
    expect(worst(last.counts, fresh.counts)).toBeLessThan(1e-12);
    expect(worst(last.luminosity!.detected, fresh.luminosity!.detected)).toBeLessThan(1e-12);
    // the limit does move the counts
    expect(last.counts[0]![0]! / first.counts[0]![0]!).toBeLessThan(0.9);
  });

  test('a prediction does not depend on what the process predicted before: without the page, a new limit makes its tables afresh (bit for bit)', () => {
    const obj = read('samples/plan-robust-uv-slope.yaml');
    const at = (limit: number) =>
      predict(
        parseSurveyObject({ ...obj, detection: { ...obj.detection, limit } }, 'samples/plan-robust-uv-slope.yaml'),
        {
          model: { draws: DRAWS },
        },
      );
    forgetLevel1Series();
    const alone = JSON.stringify(at(28.8));
    forgetLevel1Series();
    at(29.1);
    const moved = level1Paths.moved;
    const after = JSON.stringify(at(28.8));
    expect(level1Paths.moved).toBe(moved);
    expect(after).toBe(alone);
    // nor on what a page predicted before: the series the page moved to 28.8 are not read
    forgetLevel1Series();
    const page = new CountMemo();
    const onPage = (limit: number) =>
      predict(
        parseSurveyObject({ ...obj, detection: { ...obj.detection, limit } }, 'samples/plan-robust-uv-slope.yaml'),
        {
          model: { draws: DRAWS },
          countMemo: page,
        },
      );
    onPage(29.1);
    const pageMoved = level1Paths.moved;
    onPage(28.8);
    expect(level1Paths.moved).toBeGreaterThan(pageMoved);
    expect(JSON.stringify(at(28.8))).toBe(alone);
  });

  const mass = read(`${DIR}/double-schechter-mass.yaml`);
  test('double Schechter, constant threshold with a logistic completeness: two components tabulated', () => {
    const obj = {
      ...mass,
      detection: { kind: 'threshold', limit: 9.2, completeness: { model: 'logistic', half: 9.5, width: 0.1 } },
    };
    compare(obj, `${DIR}/double-schechter-mass.yaml`, true);
  });

  test('double Schechter, threshold limit tabulated in z, no completeness: counts and histograms tabulated', () => {
    compare(mass, `${DIR}/double-schechter-mass.yaml`, true);
  });

  test('threshold in absolute magnitude (slope -2.5) tabulated in z, M* and alpha evolving: tabulated', () => {
    const uv = read(`${DIR}/uv-magnitude.yaml`);
    const obj = {
      ...uv,
      detection: {
        kind: 'threshold',
        limit: {
          table: [
            [4, -18.2],
            [5.5, -18.9],
            [7, -19.6],
          ],
        },
      },
      slices: { width: 1.5 },
      histogram: { width: 0.3 },
    };
    compare(obj, `${DIR}/uv-magnitude.yaml`, true);
  });

  test('a threshold tabulated in z far brighter than L* (draws whose open bin holds a limit take the exact path)', () => {
    const obj = {
      ...mass,
      detection: {
        kind: 'threshold',
        limit: {
          table: [
            [0.2, 12.45],
            [1.0, 12.9],
          ],
        },
      },
      slices: { width: 0.4 },
      histogram: { width: 0.25 },
    };
    compare(obj, `${DIR}/double-schechter-mass.yaml`, true, true);
  });

  test('a threshold limit tabulated in z (the limit differs from node to node): the exact path', () => {
    const obj = {
      ...mass,
      detection: { ...mass.detection, completeness: { model: 'logistic', half: 9.9, width: 0.1 } },
      slices: { width: 0.4 },
    };
    compare(obj, `${DIR}/double-schechter-mass.yaml`, false);
  });

  test('cases with and without a luminosity of all sources were compared', () => {
    expect([...totalsSeen].sort()).toEqual([false, true]);
  });
});
