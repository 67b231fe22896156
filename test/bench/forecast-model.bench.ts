/**
 * forecast under the model's own uncertainty (--model-draws; src/forecast/model-spread.ts): the
 * forecast of the 10-slice H-alpha survey of the model benchmark with 1,000 draws, against the plain
 * forecast; the draws' Fisher matrices alone on a prepared grid; and --target at p50 and p84 (two
 * more root searches over the draws, the limit's rebuilding the grid at each trial).
 * And plan robust: true (200 draws) against the same plan at the assumed values, with the draws'
 * sums from the tabulated series (the default) and by exact passes (src/planning/robust.ts).
 */
import { readFileSync } from 'node:fs';
import type { BenchCase } from './run.js';
import { loadSurveyText } from '../../src/survey/load.js';
import { forecast } from '../../src/forecast/forecast.js';
import { buildDensityGrid } from '../../src/forecast/grid.js';
import { fisherParts } from '../../src/forecast/fisher.js';
import { drawnFisher, forecastDrawOffsets } from '../../src/forecast/model-spread.js';
import { FlatCosmology } from '../../src/cosmology/flat-cosmology.js';
import { plan } from '../../src/library/plan.js';

const BLOCK =
  '  model_uncertainty: {log10_phi_star: 0.1, log10_l_star: 0.06, alpha: 0.1, correlation: {log10_phi_star-alpha: 0.6}}\n';
const text = readFileSync(new URL('../../test/reference/surveys-model/line-correlated.yaml', import.meta.url), 'utf8')
  .replace('slices: {count: 4}', 'slices: {count: 10}')
  .replace(/ {2}model_uncertainty:\n( {4}.*\n)+/, BLOCK);
const s = loadSurveyText(text, 'hard.yaml');
const pop = s.populations[0]!;
const grid = buildDensityGrid(s, pop, new FlatCosmology(s.cosmology), s.sliceEdges);
const plain = fisherParts(grid);
const { thetas } = forecastDrawOffsets(s, pop, 1000, 1);
let sink = 0;

export const cases: BenchCase[] = [
  {
    name: `forecast model draws: Fisher matrices of 1000 draws on a prepared grid (${grid.pointT.length} points), 10 slices`,
    repeats: 5,
    run: () => {
      sink += drawnFisher(grid, plain, thetas, undefined).parts.length;
    },
  },
  {
    name: 'forecast model draws: forecast, 10 slices, no cosmic variance, 1000 draws',
    repeats: 5,
    run: async () => {
      sink += (await forecast(s, { cosmicVariance: false, modelDraws: 1000 })).count;
    },
  },
  {
    name: 'forecast model draws: forecast, 10 slices, no cosmic variance, no draws',
    repeats: 5,
    run: async () => {
      sink += (await forecast(s, { cosmicVariance: false })).count;
    },
  },
  {
    name: 'forecast model draws: forecast --target alpha=0.02, 10 slices, no cosmic variance, 1000 draws',
    repeats: 3,
    run: async () => {
      sink += (await forecast(s, { cosmicVariance: false, modelDraws: 1000, targets: { alpha: 0.02 } })).count;
    },
  },
  {
    name: 'forecast model draws: forecast --target alpha=0.02, 10 slices, no cosmic variance, no draws',
    repeats: 3,
    run: async () => {
      sink += (await forecast(s, { cosmicVariance: false, targets: { alpha: 0.02 } })).count;
    },
  },
];

export const _sink = () => sink;

// plan robust: true on the UV imaging plan (40 exposures) with an uncertain faint-end slope
const uvPlan = readFileSync(new URL('../../samples/plan-uv-deep-wide.yaml', import.meta.url), 'utf8')
  .replace('  alpha: "-1.95 - 0.08*(z - 6)"\n', '  alpha: "-1.95 - 0.08*(z - 6)"\n  model_uncertainty: {alpha: 0.3}\n')
  .replace('count: 200}', 'count: 40}');
const plainPlan = loadSurveyText(uvPlan, 'plan.yaml');
const robustPlan = loadSurveyText(uvPlan.replace('  tiers: 1', '  tiers: 1\n  robust: true'), 'plan.yaml');
const robustSample = loadSurveyText(
  readFileSync(new URL('../../samples/plan-robust-uv-slope.yaml', import.meta.url), 'utf8'),
  'samples/plan-robust-uv-slope.yaml',
);
cases.push(
  {
    name: 'plan robust: UV plan, 40 exposures, robust: true (200 draws)',
    repeats: 3,
    run: async () => {
      sink += (await plan(robustPlan)).designs.length;
    },
  },
  {
    name: 'plan robust: UV plan, 40 exposures, robust: true (200 draws), exact per-draw sums',
    repeats: 3,
    run: async () => {
      sink += (await plan(robustPlan, { robustSums: 'exact' })).designs.length;
    },
  },
  {
    name: 'plan robust: samples/plan-robust-uv-slope.yaml (200 draws, 24 exposures)',
    repeats: 3,
    run: async () => {
      sink += (await plan(robustSample)).designs.length;
    },
  },
  {
    name: 'plan robust: samples/plan-robust-uv-slope.yaml, exact per-draw sums',
    repeats: 3,
    run: async () => {
      sink += (await plan(robustSample, { robustSums: 'exact' })).designs.length;
    },
  },
  {
    name: 'plan robust: UV plan, 40 exposures, assumed values only',
    repeats: 3,
    run: async () => {
      sink += (await plan(plainPlan)).designs.length;
    },
  },
);
