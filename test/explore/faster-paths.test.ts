/**
 * The explore page's shortcuts give the numbers of the full computation: on every bundled sample,
 * predict with the model draws of counts only (`model: {counts: true}`, what the page asks for)
 * gives every slice's and total's count and model block exactly as the full predict (the same
 * draws and the same code: equality, not a tolerance), and leaves out only the histogram bins'
 * and the densities' model blocks; the forecast's cosmic-variance fractions read from predict's
 * memo (its per-slice counts and uncertainty blocks, what the page does) equal those computed
 * afresh, and so do the forecast's sigmas, to 1e-12 relative (the memo holds the engine's own
 * counts, which may differ from a fresh count in the last bits).
 */
import { readdirSync } from 'node:fs';
import { describe, expect, test } from 'vitest';
import { loadSurveyFile } from '../../src/survey/load.js';
import { predict } from '../../src/counts/predict.js';
import type { Prediction } from '../../src/model/outputs/prediction.js';
import { UncertaintyMemo } from '../../src/uncertainty/prediction.js';
import { cosmicVarianceInput, cosmicVarianceInputWith } from '../../src/forecast/cosmic-variance-input.js';
import { forecast } from '../../src/forecast/forecast.js';
import { surveyForPopulation } from '../../src/model/select.js';
import { countPopulation } from '../../src/counts/engine.js';
import { FlatCosmology } from '../../src/cosmology/flat-cosmology.js';

/** The memo's counts may differ from a fresh count in the last bits (see below): 1e-12 relative. */
const REL = 1e-12;
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
  test("the forecast's cosmic-variance input read from predict's memo equals the one computed afresh", async () => {
    const survey = loadSurveyFile(`samples/${sample}`);
    const memo = new UncertaintyMemo(survey);
    predict(survey, { uncertaintyMemo: memo, model: { counts: true } });
    const cosmo = new FlatCosmology(survey.cosmology);
    // photometric redshifts: predict counts by measured redshift, and forecasts refuse the file
    const scattered = survey.detection.kind !== 'line_flux' && survey.detection.photoZ !== undefined;
    for (const pop of survey.populations) {
      if (pop.shape === 'double_schechter') continue;
      const view = surveyForPopulation(survey, pop);
      const kept = memo.counts(pop, view.detection, pop.sliceEdges);
      if (!scattered) {
        // predict's counts are the engine's without histograms (to the last bits: keeping the
        // model draws' nodes may change a sum's rounding)
        const again = countPopulation(view, pop, cosmo, pop.sliceEdges, { noHistogram: true });
        expect(kept!.length).toBe(again.length);
        kept!.forEach((k, i) => {
          const g = again[i]!;
          expect([k.zMin, k.zMax, k.volumeMpc3]).toEqual([g.zMin, g.zMax, g.volumeMpc3]);
          expect(Math.abs(k.count - g.count)).toBeLessThanOrEqual(REL * g.count);
        });
      }
      const a = cosmicVarianceInputWith(memo)(view, pop.sliceEdges, pop);
      const b = cosmicVarianceInput(view, pop.sliceEdges, pop);
      expect(a.length).toBe(b.length);
      a.forEach((v, i) => expect(Math.abs(v - b[i]!)).toBeLessThanOrEqual(REL * b[i]!));
    }
    if (survey.populations[0]!.shape !== 'double_schechter' && !scattered) {
      const a = await forecast(survey, { cosmicVarianceSource: cosmicVarianceInputWith(memo) });
      const b = await forecast(survey);
      for (const k of Object.keys(b.fisher.sigma)) {
        expect(Math.abs(a.fisher.sigma[k]! / b.fisher.sigma[k]! - 1)).toBeLessThanOrEqual(REL);
        expect(a.fisher_poisson_only.sigma[k]).toBe(b.fisher_poisson_only.sigma[k]);
      }
    }
  });
});
