/**
 * predict as a library call. Targets: counts and histograms of a 10-slice survey under 2 ms; with
 * completeness and cosmic variance under 5 ms warm. "warm" repeats the same survey (the spectrum,
 * halo tables, box variances and completeness rules are all made already); "area changed" changes
 * the area on every call, so that every box variance is computed anew, as when a slider moves.
 * The completeness work of one call is printed first (the code before the quadrature in obs made
 * 40,960 completeness and as many Schechter-factor evaluations, each with four exponentials or
 * powers, for the first survey and 34,216 for the second, on every call); test/bench/instructions.ts
 * counts machine instructions, which do not depend on the machine's load.
 */
import type { BenchCase } from './run.js';
import { loadSurveyFile, loadSurveyText } from '../../src/survey/load.js';
import { fileURLToPath } from 'node:url';
import { predict } from '../../src/counts/predict.js';
import { completenessWork } from '../../src/counts/engine.js';
import { readFileSync } from 'node:fs';

function sample(name: string, edit?: (t: string) => string) {
  const text = readFileSync(new URL(`../../samples/${name}`, import.meta.url), 'utf8');
  return loadSurveyText(edit ? edit(text) : text, name);
}

const line10 = sample('halpha-narrowband.yaml', (t) => t.replace('slices: {count: 5}', 'slices: {count: 10}'));
const lineNoCompleteness10 = sample('halpha-narrowband.yaml', (t) =>
  t.replace('slices: {count: 5}', 'slices: {count: 10}').replace(/^\s+completeness:.*$/m, ''),
);
const deep = sample('deep-continuum.yaml');
const mass = sample('mass-limited.yaml', (t) => t.replace(/slices: .*$/m, 'slices: {count: 10}'));
const interlopers = loadSurveyFile(
  fileURLToPath(new URL('../../samples/narrowband-interlopers.yaml', import.meta.url)),
);
const double = sample('double-schechter-mass.yaml');

const bare = { noUncertainty: true };

let areaStep = 0;
/** The survey with its area changed by a new factor on each call. */
function otherArea(s: typeof line10) {
  const f = 1 + 1e-3 * (++areaStep % 1000);
  return { ...s, areaSr: s.areaSr * f, areaDeg2: s.areaDeg2 * f };
}

for (const [name, s] of [
  ['line_flux 10 slices, logistic', line10],
  ['magnitude 8 slices, table', deep],
] as const) {
  const counts = (run: () => unknown) => {
    completenessWork.completenessEvaluations = 0;
    completenessWork.densityEvaluations = 0;
    run();
    return `${completenessWork.completenessEvaluations} completeness, ${completenessWork.densityEvaluations} Schechter-factor`;
  };
  const first = counts(() => predict(s, bare));
  const warm = counts(() => predict(s, bare));
  console.log(`evaluations per predict, ${name}: first call ${first}; warm ${warm}`);
}

export const cases: BenchCase[] = [
  // The 10-slice library call of the explorer's budget (under 5 ms warm with everything).
  {
    name: 'predict 10 slices: histograms + completeness + cosmic variance, warm',
    run: () => predict(line10),
    repeats: 50,
  },
  {
    name: 'predict 10 slices: histograms + completeness + cosmic variance, area changed',
    run: () => predict(otherArea(line10)),
    repeats: 50,
  },
  { name: 'predict 10 slices: histograms + completeness, no uncertainty', run: () => predict(line10, bare) },
  {
    name: 'predict 10 slices: histograms + cosmic variance, no completeness',
    run: () => predict(lineNoCompleteness10),
    repeats: 50,
  },
  { name: 'predict 10 slices: histograms only', run: () => predict(lineNoCompleteness10, bare) },
  // Counts and histograms only (a target of under 2 ms for 10 slices).
  {
    name: 'predict counts: line_flux, gaussian filter, logistic completeness, 10 slices',
    run: () => predict(line10, bare),
  },
  {
    name: 'predict counts: line_flux, gaussian filter, no completeness, 10 slices',
    run: () => predict(lineNoCompleteness10, bare),
  },
  { name: 'predict counts: magnitude, evolving model, table completeness, 8 slices', run: () => predict(deep, bare) },
  { name: 'predict counts: threshold (stellar mass), 10 slices', run: () => predict(mass, bare) },
  // With Poisson and cosmic-variance uncertainties (a target of under 50 ms for 10 slices).
  {
    name: 'predict with uncertainty: line_flux, logistic completeness, 10 slices',
    run: () => predict(line10),
    repeats: 20,
  },
  { name: 'predict with uncertainty: magnitude, table completeness, 8 slices', run: () => predict(deep), repeats: 20 },
  { name: 'predict with uncertainty: threshold, 10 slices', run: () => predict(mass), repeats: 20 },
  {
    name: 'predict with uncertainty: three lines through a tabulated filter, 3 slices each',
    run: () => predict(interlopers),
    repeats: 20,
  },
  { name: 'predict counts: threshold, double Schechter, limit table, 4 slices', run: () => predict(double, bare) },
];
