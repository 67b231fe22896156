/**
 * plan.robust's draws from tabulated series (src/forecast/draw-sums.ts) against the exact per-draw
 * passes over the density grid (robustGoals with sums: 'exact', kept as the reference):
 * - the table's kernel (fisherSums) against knotSums: bit for bit;
 * - the series' numbers (the six Fisher sums of each slice and their derivatives) against knotSums
 *   at points spread over the table's ranges: 1e-10 of each number's largest magnitude (measured
 *   6.9e-12, in the derivatives, on the robust sample; the table's own error estimate is checked
 *   against robust.ts's SERIES_TOLERANCE too);
 * - every design's sigma under every draw against the exact path: 1e-8 relative (measured 2.1e-12
 *   at most), on the robust sample as written (fewer draws), on the UV plan over its wide exposure grid
 *   (two x panels) with an uncertainty without alpha (a single dA point), and on the two-layer
 *   H-alpha plan (a luminosity characteristic: the shift of opposite sign) with two-tier designs
 *   (these two Poisson only: the robust sample's designs marginalise cosmic variance);
 * - 'auto' takes the series on the robust sample, the exact passes where they are cheaper.
 * The tolerances are this file's own (the series converge geometrically; 1e-8 leaves the percentiles
 * and the ranking untouched).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import { loadSurveyText } from '../../src/survey/index.js';
import { readPlanSection } from '../../src/survey/plan-section.js';
import { makeDepthModel } from '../../src/planning/depth.js';
import { buildDesignModel, type DesignModel } from '../../src/planning/model.js';
import { combine, logGrid, pointingsFor, type Budget, type Evaluated } from '../../src/planning/search.js';
import {
  robustGoals,
  KNOT_STEP,
  SERIES_OPTIONS,
  SERIES_TOLERANCE,
  type RobustContext,
} from '../../src/planning/robust.js';
import { drawSumsTable, fisherSums } from '../../src/forecast/draw-sums.js';
import { knotSums } from '../../src/planning/tables.js';
import { buildDensityGrid, sliceCount } from '../../src/forecast/grid.js';
import { forecastDrawOffsets } from '../../src/forecast/model-spread.js';
import { FlatCosmology } from '../../src/cosmology/flat-cosmology.js';
import { parameterNames } from '../../src/model/population.js';
import { surveyForPopulation } from '../../src/model/select.js';

interface Setup {
  ctx: RobustContext;
  model: DesignModel;
  designs: Evaluated[];
}

/**
 * A plan file's design model and its single-tier designs (every exposure of its grid), and two-tier
 * ones if asked; with cosmic variance (the fractions the designs marginalise) unless told otherwise.
 */
async function setup(
  text: string,
  file: string,
  draws: number,
  twoTier = false,
  cosmicVariance = true,
): Promise<Setup> {
  const s = loadSurveyText(text, file);
  const population = s.populations[0]!;
  const spec = readPlanSection(s, population);
  const survey = surveyForPopulation(s, population);
  const exposures = logGrid(spec.grid.minHours, spec.grid.maxHours, spec.grid.count);
  const budget: Budget = { budgetHours: spec.budgetHours, overheadHours: spec.overheadHours, minimumCount: 0 };
  const maxP = Math.floor(spec.budgetHours / (exposures[0]! + spec.overheadHours));
  const model = await buildDesignModel(
    survey,
    population,
    { ...spec, depth: makeDepthModel(spec.limitKind, spec.depthLaw) },
    [exposures[0]!, exposures[exposures.length - 1]!],
    [1, maxP],
    { workers: 1, cosmicVariance },
  );
  const parameterIndex =
    spec.goal.kind === 'sigma' ? (parameterNames(population) as string[]).indexOf(spec.goal.parameter) : 0;
  const tier = (h: number, share: number) => model.tier(h, pointingsFor(model, share, h, spec.overheadHours));
  const designs = exposures.map((h) => combine(spec.goal, parameterIndex, budget, [tier(h, spec.budgetHours)], [1]));
  if (twoTier)
    for (let i = 0; i + 8 < exposures.length; i += 7) {
      const [wide, deep] = [exposures[i]!, exposures[i + 8]!];
      designs.push(
        combine(
          spec.goal,
          parameterIndex,
          budget,
          [tier(wide, 0.6 * spec.budgetHours), tier(deep, 0.4 * spec.budgetHours)],
          [0.6, 0.4],
        ),
      );
    }
  const ctx: RobustContext = { file: s, population, model, goal: spec.goal, parameterIndex, draws, seed: 1 };
  return { ctx, model, designs };
}

/** Largest relative difference of every design's value under every draw, series against exact. */
function perDrawDifference({ ctx, designs }: Setup): { worst: number; compared: number; tabulated: boolean } {
  const exact = robustGoals({ ...ctx, sums: 'exact' }, designs);
  const series = robustGoals({ ...ctx, sums: 'series' }, designs);
  let worst = 0;
  let compared = 0;
  // every design and draw checked; what fails collected for one expect
  const wrong: string[] = [];
  designs.forEach((d, k) => {
    const a = exact.perDraw(d);
    const b = series.perDraw(d);
    if (!a || !b) return;
    if (b.length !== a.length) wrong.push(`design ${k}: ${b.length} draws, not ${a.length}`);
    for (let i = 0; i < a.length; i++) {
      // a draw at zero offsets is the design's own goal on both paths
      if (a[i] === d.goal && !Object.is(b[i], a[i])) wrong.push(`design ${k} draw ${i}: ${b[i]}, not the goal ${a[i]}`);
      if (!Number.isFinite(a[i]!)) wrong.push(`design ${k} draw ${i}: ${a[i]}`);
      worst = Math.max(worst, Math.abs(b[i]! / a[i]! - 1));
      compared++;
    }
  });
  expect(wrong).toEqual([]);
  return { worst, compared, tabulated: series.tabulated };
}

const ROBUST = 'samples/plan-robust-uv-slope.yaml';
const UV = 'samples/plan-uv-deep-wide.yaml';
const HALPHA = 'samples/plan-halpha-layers.yaml';
const read = (f: string) => readFileSync(f, 'utf8');
/** The robust sample's design model and designs, built once for the tests that use it. */
let robustSample: Promise<Setup> | undefined;
const robust = () => (robustSample ??= setup(read(ROBUST), ROBUST, 200));

describe('draws from tabulated series', () => {
  test('the series against knotSums over the ranges of the robust sample (1e-10 of each number)', async () => {
    const { ctx, model, designs } = await robust();
    const grid = buildDensityGrid(
      model.reference,
      ctx.population,
      new FlatCosmology(model.reference.cosmology),
      model.reference.sliceEdges,
      2 * Math.PI,
    );
    const { thetas } = forecastDrawOffsets(ctx.file, ctx.population, 200, 1);
    const deltas = designs.flatMap((e) => e.tiers.map((t) => model.deltaAt(t.hours)));
    const shifts = thetas.map((th) => grid.shift * th[1]!);
    const alphas = thetas.map((th) => th[2]!);
    const x: [number, number] = [Math.min(...deltas) + Math.min(...shifts), Math.max(...deltas) + Math.max(...shifts)];
    const a: [number, number] = [Math.min(...alphas), Math.max(...alphas)];
    const table = drawSumsTable(grid, x, a, SERIES_OPTIONS);
    expect(table.errorEstimate + (4 / 27) * KNOT_STEP * table.slopeErrorEstimate).toBeLessThan(SERIES_TOLERANCE);
    const width = 12 * sliceCount(grid);
    const knots = 9;
    const want = new Float64Array(knots * width);
    const got = new Float64Array(knots * width);
    // 9 knots from the lowest x, at 13 values of dA across its range (the ends included)
    const step = (x[1] - x[0]) / (knots - 1);
    let worst = 0;
    /** Numbers (row, dA) that are zero at every knot: the comparison must be of something. */
    const zero: string[] = [];
    for (let j = 0; j <= 12; j++) {
      const dA = a[0] + ((a[1] - a[0]) * j) / 12;
      for (let k = 0; k < knots; k++) knotSums(grid, x[0] + k * step, dA, want, k * width);
      table.fill(x[0], step, knots, dA, got, 0, width);
      for (let r = 0; r < width; r++) {
        let scale = 0;
        for (let k = 0; k < knots; k++) scale = Math.max(scale, Math.abs(want[k * width + r]!));
        if (!(scale > 0)) zero.push(`row ${r} at dA ${dA}`);
        for (let k = 0; k < knots; k++)
          worst = Math.max(worst, Math.abs(got[k * width + r]! - want[k * width + r]!) / scale);
      }
    }
    expect(zero).toEqual([]);
    expect(worst).toBeLessThan(1e-10);
    // the table's kernel is knotSums without the derivatives, term for term: bit for bit
    const six = new Float64Array(6 * sliceCount(grid));
    for (const [xv, dA] of [
      [x[0], a[0]],
      [0.37, 0.05],
      [x[1], a[1]],
    ] as const) {
      knotSums(grid, xv, dA, want, 0);
      fisherSums(grid, xv, dA, six, 0);
      for (let sl = 0; sl < sliceCount(grid); sl++)
        expect([...six.subarray(6 * sl, 6 * sl + 6)]).toEqual([...want.subarray(12 * sl, 12 * sl + 6)]);
    }
  }, 120_000);

  test('every sigma under every draw: the robust sample (1e-8 relative)', async () => {
    const s = await robust();
    const r = perDrawDifference({ ...s, ctx: { ...s.ctx, draws: 40 } });
    expect(r.tabulated).toBe(true);
    expect(r.compared).toBeGreaterThan(40 * 20);
    expect(r.worst).toBeLessThan(1e-8);
  }, 120_000);

  test('the UV plan over its wide exposure grid, no alpha uncertainty (1e-8 relative)', async () => {
    const text = read(UV).replace(
      '  alpha: "-1.95 - 0.08*(z - 6)"\n',
      '  alpha: "-1.95 - 0.08*(z - 6)"\n  model_uncertainty: {log10_phi_star: 0.1, m_star: 0.25, correlation: {log10_phi_star-m_star: 0.5}}\n',
    );
    expect(text).toContain('model_uncertainty');
    const r = perDrawDifference(await setup(text.replace('count: 200}', 'count: 16}'), UV, 12, false, false));
    expect(r.compared).toBeGreaterThan(12 * 12);
    expect(r.worst).toBeLessThan(1e-8);
  }, 120_000);

  test('the H-alpha plan with two-tier designs, uncertain knee and slope (1e-8 relative)', async () => {
    const text = read(HALPHA)
      .replace(
        '  alpha: -1.45\n',
        '  alpha: -1.45\n  model_uncertainty: {log10_phi_star: 0.08, log10_l_star: 0.06, alpha: 0.1, correlation: {log10_l_star-alpha: 0.6}}\n',
      )
      .replace('{min_hours: 0.03, max_hours: 40, count: 120}', '{min_hours: 0.3, max_hours: 12, count: 30}');
    expect(text).toContain('model_uncertainty');
    expect(text).toContain('count: 30}');
    const s = await setup(text, HALPHA, 30, true, false);
    expect(s.designs.some((d) => d.tiers.length === 2)).toBe(true);
    const r = perDrawDifference(s);
    expect(r.compared).toBeGreaterThan(30 * 30);
    expect(r.worst).toBeLessThan(1e-8);
  }, 120_000);

  test("'auto': the series on the robust sample, the exact passes for a handful of draws", async () => {
    const { ctx, designs } = await robust();
    const few = designs.slice(0, 3);
    expect(robustGoals({ ...ctx, draws: 200 }, few).tabulated).toBe(true);
    expect(robustGoals({ ...ctx, draws: 4 }, few).tabulated).toBe(false);
  }, 120_000);
});
