/**
 * predict's options from a script are refused as the command line refuses --draws and --seed
 * (failed before: draws -5 and 2.5 and seed -1 were taken as given).
 */
import { describe, expect, test } from 'vitest';
import { loadSurveyFile } from '../../src/survey/load.js';
import { predict } from '../../src/counts/predict.js';
import { SurveyError } from '../../src/errors.js';

const survey = loadSurveyFile(new URL('../../samples/mass-limited.yaml', import.meta.url).pathname);

describe('predict options', () => {
  test.each([
    [{ draws: -5 }, 'model.draws'],
    [{ draws: 2.5 }, 'model.draws'],
    [{ draws: 100_001 }, 'model.draws'],
    [{ seed: -1 }, 'model.seed'],
    [{ seed: 0.5 }, 'model.seed'],
    [{ seed: 2 ** 32 }, 'model.seed'],
  ])('%j is bad_option naming %s', (model, keyPath) => {
    let e: unknown;
    try {
      predict(survey, { model });
    } catch (err) {
      e = err;
    }
    expect(e).toBeInstanceOf(SurveyError);
    expect({ code: (e as SurveyError).code, keyPath: (e as SurveyError).keyPath }).toEqual({
      code: 'bad_option',
      keyPath,
    });
    expect((e as SurveyError).message).toContain(`give ${keyPath} a whole number in that range.`);
  });
  test('draws 0 (none), 1 and seeds 0 and 2^32 - 1 run', () => {
    expect(predict(survey, { model: { draws: 0 } }).totals.model).toBeUndefined();
    expect(predict(survey, { model: { draws: 1, seed: 0 } }).totals.model?.draws).toBe(1);
    expect(predict(survey, { model: { draws: 1, seed: 4294967295 } }).totals.model?.draws).toBe(1);
  });
});
