/** Drawing cost: every figure for an invented 10-slice demo (vega + vega-lite to SVG in Node). */
import type { BenchCase } from './run.js';
import { buildFigures, countsFigure } from '../../src/render/figures.js';
import { renderReport } from '../../src/render/report.js';
import { writeFigures } from '../../src/render/write-figures.js';
import { demoForecast, demoPlan, demoPrediction } from '../render/demo.js';
import { tempDir } from '../support/temp.js';

const prediction = demoPrediction({ slices: 10 });
const forecast = demoForecast({ mocks: 200 });
const plan = demoPlan();
const figures = await buildFigures({ prediction, forecast, plan });
const dir = tempDir('skytally-bench-');

export const cases: BenchCase[] = [
  {
    name: 'figures: all 5 for a 10-slice demo (200 mocks)',
    run: () => buildFigures({ prediction, forecast, plan }),
    repeats: 15,
  },
  { name: 'figures: counts only, 10 slices', run: () => countsFigure(prediction), repeats: 30 },
  {
    name: 'report: renderReport with 5 figures',
    run: () =>
      renderReport({ surveyText: 'format: 1\n', surveyTitle: prediction.title, prediction, forecast, plan, figures }),
    repeats: 30,
  },
  { name: 'write: 5 figures as SVG + PNG (x2)', run: () => writeFigures(dir, figures), repeats: 5 },
];
