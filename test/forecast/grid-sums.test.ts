/**
 * The density grid's Fisher sums made as the points are (densityFisherParts, what the explore
 * page's forecasts use) are those of the grid's arrays (fisherParts of buildDensityGrid) bit for
 * bit: the same points in the same order, the same arithmetic term for term. Every bundled
 * sample whose first population a forecast accepts (a single Schechter function, redshifts not
 * scattered), and each of its populations on its own window.
 */
import { readdirSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import { loadSurveyFile } from '../../src/survey/load.js';
import { buildDensityGrid, densityFisherParts } from '../../src/forecast/grid.js';
import { fisherParts } from '../../src/forecast/fisher.js';
import { FlatCosmology } from '../../src/cosmology/flat-cosmology.js';
import { surveyForPopulation } from '../../src/model/select.js';

const SAMPLES = readdirSync('samples').filter((f) => f.endsWith('.yaml'));

describe.each(SAMPLES)('%s', (sample) => {
  test('the sums made point by point equal those of the grid bit for bit', () => {
    const survey = loadSurveyFile(`samples/${sample}`);
    const cosmo = new FlatCosmology(survey.cosmology);
    const scattered = survey.detection.kind !== 'line_flux' && survey.detection.photoZ !== undefined;
    let compared = 0;
    for (const pop of survey.populations) {
      if (pop.shape !== 'schechter' || scattered) continue;
      const view = surveyForPopulation(survey, pop);
      const want = fisherParts(buildDensityGrid(view, pop, cosmo, pop.sliceEdges));
      const got = densityFisherParts(view, pop, cosmo, pop.sliceEdges);
      expect(got).toEqual(want);
      expect(want.count).toBeGreaterThan(0);
      compared++;
    }
    if (!scattered && survey.populations.some((p) => p.shape === 'schechter')) expect(compared).toBeGreaterThan(0);
  });
});
