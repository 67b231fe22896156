/** The SurveyError a call throws (any other error is rethrown; no error fails the test). */
import { SurveyError } from '../../src/errors.js';

export function errorOf(f: () => unknown): SurveyError {
  try {
    f();
  } catch (e) {
    if (e instanceof SurveyError) return e;
    throw e;
  }
  throw new Error('expected a SurveyError, got a survey');
}
