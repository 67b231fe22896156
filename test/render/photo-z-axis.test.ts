/**
 * With photometric redshifts the slices hold the sources measured in them (docs/survey-file.md,
 * "Photometric redshifts"), so the counts figure's axis says measured redshift; without, it stays
 * "redshift z" (failed before: "redshift z" on both).
 */
import { describe, expect, test } from 'vitest';
import { loadSurveyFile } from '../../src/survey/index.js';
import { predict } from '../../src/counts/predict.js';
import { countsSpec } from '../../src/render/figures.js';
import { predictionViews } from '../../src/render/draw.js';

type Layer = { encoding?: { x?: { title?: string } } };
const xTitle = (file: string): string | undefined => {
  const survey = loadSurveyFile(file);
  const spec = countsSpec(predictionViews(survey, predict(survey), 3).combined)!;
  return (spec.layer as Layer[]).find((l) => l.encoding?.x?.title)?.encoding?.x?.title;
};

describe('the counts figure names the redshift the slices are cut in', () => {
  test('photometric: measured redshift', () => {
    expect(xTitle('samples/photoz-optical-field.yaml')).toBe('measured (photometric) redshift z');
  });
  test('spectroscopic or narrow band: redshift z', () => {
    expect(xTitle('samples/deep-continuum.yaml')).toBe('redshift z');
  });
});
