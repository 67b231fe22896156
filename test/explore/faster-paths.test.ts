/**
 * The explore page's shortcuts give the numbers of the full computation: on every bundled sample,
 * predict with the model draws of counts only (`model: {counts: true}`, what the page asks for)
 * gives every slice's and total's count and model block exactly as the full predict (the same
 * draws and the same code: equality, not a tolerance), and leaves out only the histogram bins'
 * and the densities' model blocks; and the page's forecast sigmas are those of the library's
 * forecast of the same file bit for bit (both take the cosmic-variance fractions from the density
 * grid's own slice counts: equality, not a tolerance).
 */
import { readdirSync, readFileSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import { loadSurveyFile } from '../../src/survey/load.js';
import { predict } from '../../src/counts/predict.js';
import type { Prediction } from '../../src/model/outputs/prediction.js';
import type { Forecast } from '../../src/model/outputs/forecast.js';
import { forecast } from '../../src/forecast/forecast.js';
import { exploreCompute } from '../../src/library/explore/engine.js';

const SAMPLES = readdirSync('samples').filter((f) => f.endsWith('.yaml'));

/** Every slice of a prediction: the top level's and each population's. */
function slicesOf(p: Prediction) {
  return [...(p.breakdown === 'redshift' ? p.slices : []), ...p.populations.flatMap((q) => q.slices)];
}

describe.each(SAMPLES)('%s', (sample) => {
  test('predict with the model draws of counts only equals the full predict on counts and their model blocks', () => {
    const survey = loadSurveyFile(`samples/${sample}`);
    const full = predict(survey);
    const fast = predict(survey, { model: { counts: true } });
    expect(fast.totals.count).toBe(full.totals.count);
    expect(fast.totals.model).toEqual(full.totals.model);
    expect(fast.totals.uncertainty).toEqual(full.totals.uncertainty);
    const a = slicesOf(full);
    const b = slicesOf(fast);
    expect(b.length).toBe(a.length);
    a.forEach((s, i) => {
      expect(b[i]!.count).toBe(s.count);
      expect(b[i]!.model).toEqual(s.model);
      expect(b[i]!.uncertainty).toEqual(s.uncertainty);
      expect(b[i]!.histogram.counts).toEqual(s.histogram.counts);
      expect(b[i]!.histogram.model).toBeUndefined();
      expect(b[i]!.luminosity_density?.model).toBeUndefined();
    });
    // the samples with model_uncertainty do have what the shortcut leaves out
    if (survey.populations.some((p) => p.modelUncertainty)) {
      expect(full.totals.model).toBeDefined();
      expect(a.some((s) => s.histogram.model !== undefined)).toBe(true);
    }
  });
  test("the page's forecast sigmas are the library forecast's bit for bit (its cosmic variance from the grid's own counts)", async () => {
    const path = `samples/${sample}`;
    const r = await exploreCompute({ text: readFileSync(path, 'utf8') }, path, 'samples');
    expect(r.error).toBeUndefined();
    const survey = loadSurveyFile(path);
    if (survey.populations[0]!.shape === 'double_schechter') {
      expect(r.fisher).toBeUndefined();
      return;
    }
    let f: Forecast;
    try {
      f = await forecast(survey);
    } catch (e) {
      // the page says why there is no forecast, in the forecast's own words
      expect(r.fisher).toBeUndefined();
      expect(r.fisherNote).toBe((e as Error).message);
      return;
    }
    expect(r.fisher!.names).toEqual(f.parameters);
    expect(r.fisher!.sigma).toEqual(f.parameters.map((n) => f.fisher.sigma[n]));
    expect(r.fisher!.sigmaPoisson).toEqual(f.parameters.map((n) => f.fisher_poisson_only.sigma[n]));
  });
});
