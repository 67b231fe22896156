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

export const cases: BenchCase[] = [
  { name: 'predict: line_flux, gaussian filter, logistic completeness, 10 slices', run: () => predict(line10) },
  { name: 'predict: line_flux, gaussian filter, no completeness, 10 slices', run: () => predict(lineNoCompleteness10) },
  { name: 'predict: magnitude, evolving model, table completeness, 8 slices', run: () => predict(deep) },
  { name: 'predict: threshold (stellar mass), 10 slices', run: () => predict(mass) },
  { name: 'predict: three lines through a tabulated filter, logistic completeness, 3 slices each', run: () => predict(interlopers) },
  { name: 'predict: threshold, double Schechter, limit table, 4 slices', run: () => predict(double) },
];
