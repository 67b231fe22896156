/**
 * predict's spread under the model's own uncertainty (model_uncertainty; src/counts/model-draws.ts)
 * as a library call: 1,000 draws of a 10-slice survey (target under 0.5 s), with a hard limit, a
 * tabulated completeness and a logistic one. Each case is the draws alone (populationDraws on the
 * nodes of one plain count; where the completeness varies, by the slice tables and, for
 * comparison, by the exact path that redoes every node's quadrature per draw), and predict with and
 * without them; and predict of the robust UV plan sample (samples/plan-robust-uv-slope.yaml).
 */
import type { BenchCase } from './run.js';
import { loadSurveyText } from '../../src/survey/load.js';
import { readFileSync } from 'node:fs';
import { predict } from '../../src/counts/predict.js';
import { FlatCosmology } from '../../src/cosmology/flat-cosmology.js';
import { countPopulation } from '../../src/counts/engine.js';
import { drawModelOffsets, populationDraws } from '../../src/counts/model-draws.js';

const BLOCK =
  '  model_uncertainty: {log10_phi_star: 0.1, log10_l_star: 0.06, alpha: 0.1, correlation: {log10_phi_star-alpha: 0.6}}\n';
const text = readFileSync(new URL('../../test/reference/surveys-model/line-correlated.yaml', import.meta.url), 'utf8')
  .replace('slices: {count: 4}', 'slices: {count: 10}')
  .replace(/ {2}model_uncertainty:\n( {4}.*\n)+/, BLOCK);
const hard = loadSurveyText(text, 'hard.yaml');
const table = loadSurveyText(
  text.replace(
    '  line: 6562.8\n',
    '  line: 6562.8\n  completeness: {model: table, table: [[1.5e-16, 0.4], [3e-16, 0.8], [1e-15, 0.97]]}\n',
  ),
  'table.yaml',
);
const logistic = loadSurveyText(
  text.replace('  line: 6562.8\n', '  line: 6562.8\n  completeness: {model: logistic, half: 2.5e-16, width: 0.15}\n'),
  'logistic.yaml',
);

function drawsOnly(s: typeof hard, histogramDraws: number, exact = false) {
  const pop = s.populations[0]!;
  const cosmo = new FlatCosmology(s.cosmology);
  const own = countPopulation(s, pop, cosmo, pop.sliceEdges, { drawNodes: true });
  const offsets = drawModelOffsets(pop.modelUncertainty!, 1, 1000, 1, 0);
  return () => populationDraws(s, pop, cosmo, own, offsets, { luminosity: true, histogramDraws, exact });
}

const robust = loadSurveyText(
  readFileSync(new URL('../../samples/plan-robust-uv-slope.yaml', import.meta.url), 'utf8'),
  'samples/plan-robust-uv-slope.yaml',
);

export const cases: BenchCase[] = [
  // the robust plan sample: 4 slices, magnitudes, a logistic completeness, 1,000 draws with 100 histograms
  { name: 'model draws: predict, robust UV plan sample, 1000 draws', run: () => predict(robust), repeats: 9 },
  {
    name: 'model draws: predict, robust UV plan sample, no draws',
    run: () => predict(robust, { model: { draws: 0 } }),
    repeats: 9,
  },
];
for (const [name, s] of [
  ['hard limit', hard],
  ['table completeness', table],
  ['logistic completeness', logistic],
] as const) {
  cases.push(
    { name: `model draws: 1000 draws, 10 slices, ${name}: counts and densities`, run: drawsOnly(s, 0), repeats: 5 },
    { name: `model draws: 1000 draws, 10 slices, ${name}: with 100 histograms`, run: drawsOnly(s, 100), repeats: 5 },
    ...(name === 'hard limit'
      ? []
      : [
          {
            name: `model draws: 1000 draws, 10 slices, ${name}: exact path`,
            run: drawsOnly(s, 0, true),
            repeats: name === 'logistic completeness' ? 1 : 3,
          },
        ]),
    { name: `model draws: predict, 10 slices, ${name}, 1000 draws`, run: () => predict(s), repeats: 5 },
    {
      name: `model draws: predict, 10 slices, ${name}, no draws`,
      run: () => predict(s, { model: { draws: 0 } }),
      repeats: 5,
    },
  );
}
