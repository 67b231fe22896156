/**
 * The report computes the per-slice uncertainty once (predict) and lets the forecast read its
 * cosmic-variance fractions back (UncertaintyMemo, cosmicVarianceInputWith). The reference here is
 * the plain computation of the same program (cosmicVarianceInput, which is itself checked against
 * predict in cli.test.ts): the forecast must be identical to the last bit (tolerance 0), for every
 * single-Schechter sample, and the memo must actually be read (not silently recomputed).
 */
import { describe, expect, test } from 'vitest';
import { loadSurveyFile } from '../../src/survey/load.js';
import { predict } from '../../src/counts/predict.js';
import { forecast } from '../../src/forecast/forecast.js';
import { cosmicVarianceInput, cosmicVarianceInputWith } from '../../src/forecast/cosmic-variance-input.js';
import { UncertaintyMemo, type UncertaintyJson } from '../../src/uncertainty/prediction.js';
import type { Population } from '../../src/model/population.js';

const samples = [
  'halpha-narrowband.yaml',
  'deep-continuum.yaml',
  'mass-limited.yaml',
  'plan-halpha-layers.yaml',
  'plan-uv-deep-wide.yaml',
];

describe("forecast with the prediction's uncertainty memo (exact reuse, tolerance 0)", () => {
  for (const f of samples) {
    test(`${f}: the same forecast as computing the fractions again`, async () => {
      const survey = loadSurveyFile(`samples/${f}`);
      const memo = new UncertaintyMemo(survey);
      const pred = predict(survey, { uncertaintyMemo: memo });
      // predict is unchanged by keeping its blocks
      expect(pred).toEqual(predict(survey));
      const population = survey.populations[0]!;
      expect(cosmicVarianceInputWith(memo)(survey, survey.sliceEdges, population)).toEqual(
        cosmicVarianceInput(survey, survey.sliceEdges, population),
      );
      const reused = await forecast(survey, { cosmicVarianceSource: cosmicVarianceInputWith(memo) });
      const plain = await forecast(survey);
      expect(reused).toEqual(plain);
    });
  }

  test('the memo is read: a block planted for exact inputs is returned as is', () => {
    const survey = loadSurveyFile('samples/halpha-narrowband.yaml');
    const memo = new UncertaintyMemo(survey);
    predict(survey, { uncertaintyMemo: memo });
    const population = survey.populations[0]!;
    const plain = cosmicVarianceInput(survey, survey.sliceEdges, population);
    // Replace every kept block with a marked one: what the forecast reads must be the mark.
    const marked = new UncertaintyMemo(survey);
    const spy = memo as unknown as { blocks: Map<Population, Map<string, UncertaintyJson | undefined>> };
    let kept = 0;
    for (const [p, m] of spy.blocks) {
      for (const [k, b] of m) {
        const [count, volume, zMin, zMax, zc] = k.split(',').map(Number) as [number, number, number, number, number];
        marked.set(p, count, volume, zMin, zMax, zc, b && { ...b, cosmic_variance_fraction: 0.123 });
        kept++;
      }
    }
    expect(kept).toBeGreaterThanOrEqual(survey.sliceEdges.length - 1);
    const read = cosmicVarianceInputWith(marked)(survey, survey.sliceEdges, population);
    expect(read).toEqual(plain.map(() => 0.123));
  });

  test('a memo of another survey object is not read', () => {
    const survey = loadSurveyFile('samples/halpha-narrowband.yaml');
    const other = loadSurveyFile('samples/halpha-narrowband.yaml');
    const memo = new UncertaintyMemo(other);
    predict(other, { uncertaintyMemo: memo });
    const population = survey.populations[0]!;
    expect(cosmicVarianceInputWith(memo)(survey, survey.sliceEdges, population)).toEqual(
      cosmicVarianceInput(survey, survey.sliceEdges, population),
    );
  });
});
