/** predict as a library call (issue 2: target under 2 ms median for a 10-slice survey). */
import type { BenchCase } from './run.js';
import { loadSurveyFile, loadSurveyText } from '../../src/survey/load.js';
import { fileURLToPath } from 'node:url';
import { predict } from '../../src/counts/predict.js';
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
const interlopers = loadSurveyFile(fileURLToPath(new URL('../../samples/narrowband-interlopers.yaml', import.meta.url)));
const double = sample('double-schechter-mass.yaml');

const bare = { noUncertainty: true };

export const cases: BenchCase[] = [
  // Counts and histograms only (issue 2: under 2 ms for 10 slices).
  { name: 'predict counts: line_flux, gaussian filter, logistic completeness, 10 slices', run: () => predict(line10, bare) },
  { name: 'predict counts: line_flux, gaussian filter, no completeness, 10 slices', run: () => predict(lineNoCompleteness10, bare) },
  { name: 'predict counts: magnitude, evolving model, table completeness, 8 slices', run: () => predict(deep, bare) },
  { name: 'predict counts: threshold (stellar mass), 10 slices', run: () => predict(mass, bare) },
  // With Poisson and cosmic-variance uncertainties (issue 3: under 50 ms for 10 slices).
  { name: 'predict with uncertainty: line_flux, logistic completeness, 10 slices', run: () => predict(line10), repeats: 20 },
  { name: 'predict with uncertainty: magnitude, table completeness, 8 slices', run: () => predict(deep), repeats: 20 },
  { name: 'predict with uncertainty: threshold, 10 slices', run: () => predict(mass), repeats: 20 },
  { name: 'predict with uncertainty: three lines through a tabulated filter, 3 slices each', run: () => predict(interlopers), repeats: 20 },
  { name: 'predict counts: threshold, double Schechter, limit table, 4 slices', run: () => predict(double, bare) },
];
