/**
 * Errors that reach the user. A `SurveyError` is bad input: the CLI prints its one-sentence
 * message and exits with status 2. Anything else is an internal failure (status 1).
 */

/** Stable error codes; tests assert these, not the wording. */
export type ErrorCode =
  | 'yaml_syntax'
  | 'file_unreadable'
  | 'file_too_large'
  | 'yaml_aliases'
  | 'unknown_key'
  | 'missing_key'
  | 'wrong_type'
  | 'bad_unit'
  | 'out_of_range'
  | 'bad_window'
  | 'bad_slices'
  | 'bad_table'
  | 'bad_expression'
  | 'conflict'
  | 'kind_mismatch'
  | 'divergent'
  | 'bad_option'
  | 'not_finite'
  | 'output_exists';

export class SurveyError extends Error {
  readonly code: ErrorCode;
  /** Path of the offending key, e.g. "detection.filter.center" (empty when not about one key). */
  readonly keyPath: string;
  /** The file the problem is in (empty for command-line options). */
  readonly file: string;

  constructor(code: ErrorCode, file: string, keyPath: string, message: string) {
    super(message);
    this.name = 'SurveyError';
    this.code = code;
    this.file = file;
    this.keyPath = keyPath;
  }
}

/**
 * Build the one clear sentence: "<file>: <key>: <what is wrong>; <what to do>."
 * `what` and `fix` are plain phrases without a trailing full stop.
 */
export function inputError(
  code: ErrorCode,
  file: string,
  keyPath: string,
  what: string,
  fix?: string,
): SurveyError {
  const where = [file, keyPath].filter((s) => s.length > 0).join(': ');
  const sentence = `${where ? where + ': ' : ''}${what}${fix ? `; ${fix}` : ''}.`;
  return new SurveyError(code, file, keyPath, sentence);
}

/** Throw a SurveyError (code not_finite) unless every number in `values` is finite. */
export function assertFinite(file: string, keyPath: string, what: string, ...values: number[]): void {
  for (const v of values) {
    if (!Number.isFinite(v)) {
      throw inputError('not_finite', file, keyPath, `${what} is not a finite number`, 'check the model parameters and limits');
    }
  }
}
