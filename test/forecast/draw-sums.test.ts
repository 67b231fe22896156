/**
 * forecast --model-draws with each draw's sums from tabulated series (src/forecast/draw-sums.ts,
 * drawnFisher's 'series') against one pass over the grid per draw (fisherPartsAt, 'exact', kept
 * as the reference): every draw's sigmas, with the cosmic-variance nuisances and Poisson only, to
 * 1e-8 relative (this file's tolerance; measured 2.3e-12 and 1.3e-13), on the robust UV plan sample's survey
 * (magnitudes, all three parameters uncertain and correlated, a logistic completeness) and on the
 * correlated line-flux reference survey (a luminosity characteristic: the shift of opposite sign);
 * and 'auto' takes the series for many draws, the exact passes for a few.
 */
import { describe, expect, test } from 'vitest';
import { loadSurveyFile } from '../../src/survey/index.js';
import { buildDensityGrid } from '../../src/forecast/grid.js';
import { fisherParts } from '../../src/forecast/fisher.js';
import { drawnFisher, forecastDrawOffsets } from '../../src/forecast/model-spread.js';
import { FlatCosmology } from '../../src/cosmology/flat-cosmology.js';
import { surveyForPopulation } from '../../src/model/select.js';

/** The grid, plain parts and draws of a file's first population, with invented cosmic-variance fractions. */
function prepared(file: string, draws: number) {
  const s = loadSurveyFile(file);
  const population = s.populations[0]!;
  const survey = surveyForPopulation(s, population);
  const grid = buildDensityGrid(survey, population, new FlatCosmology(survey.cosmology), survey.sliceEdges);
  const plain = fisherParts(grid);
  const { thetas } = forecastDrawOffsets(s, population, draws, 3);
  const f = plain.slices.map((_, i) => 0.05 + 0.02 * i);
  // an invented correlation between the slices' nuisances, 0.3^|i - j|
  const fractions = { fractions: f, correlation: f.map((_, i) => f.map((_, j) => 0.3 ** Math.abs(i - j))) };
  return { grid, plain, thetas, fractions };
}

function worstDifference(file: string, draws: number): { worst: number; compared: number } {
  const { grid, plain, thetas, fractions } = prepared(file, draws);
  const exact = drawnFisher(grid, plain, thetas, fractions, 'exact');
  const series = drawnFisher(grid, plain, thetas, fractions, 'series');
  let worst = 0;
  let compared = 0;
  for (const kind of ['withCv', 'poisson'] as const)
    exact[kind].forEach((e, i) => {
      const s = series[kind][i];
      expect(e).toBeDefined();
      expect(s).toBeDefined();
      e!.sigma.forEach((v, j) => {
        worst = Math.max(worst, Math.abs(s!.sigma[j]! / v - 1));
        compared++;
      });
    });
  return { worst, compared };
}

describe('model draws of a forecast from tabulated series', () => {
  test('the robust UV plan sample: every sigma of every draw (1e-8 relative)', () => {
    const r = worstDifference('samples/plan-robust-uv-slope.yaml', 60);
    expect(r.compared).toBe(2 * 60 * 3);
    expect(r.worst).toBeLessThan(1e-8);
  }, 120_000);

  test('the correlated line-flux reference survey (1e-8 relative)', () => {
    const r = worstDifference('test/reference/surveys-model/line-correlated.yaml', 120);
    expect(r.compared).toBe(2 * 120 * 3);
    expect(r.worst).toBeLessThan(1e-8);
  }, 120_000);

  test("'auto': the series for the report's 1,000 draws, the exact passes for a handful", () => {
    const { grid, plain, thetas, fractions } = prepared('test/reference/surveys-model/line-correlated.yaml', 1000);
    expect(drawnFisher(grid, plain, thetas, fractions).tabulated).toBe(true);
    expect(drawnFisher(grid, plain, thetas.slice(0, 12), fractions).tabulated).toBe(false);
  }, 120_000);
});
