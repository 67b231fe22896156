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
  | 'no_sources'
  | 'singular_fisher'
  | 'not_positive_definite'
  | 'output_exists'
  | 'not_a_file'
  | 'not_text'
  | 'too_large'
  | 'output_unwritable';

export class SurveyError extends Error {
  readonly code: ErrorCode;
  /** Path of the offending key, e.g. "detection.filter.center" (empty when not about one key). */
  readonly keyPath: string;
  /** The file the problem is in (empty for command-line options). */
  readonly file: string;
  /**
   * The sentence after its place: what is wrong and what to do ("is 2.5, not a whole number from 1
   * to 100000; give --draws a whole number in that range."), as written, before `printable`.
   */
  readonly text: string;

  /**
   * The message is "<file>: <key>: <text>" (the empty parts left out) made printable, unless
   * `message` gives the sentence in another order (the command line's "predict --draws: FILE: ...").
   */
  constructor(code: ErrorCode, file: string, keyPath: string, text: string, message?: string) {
    super(message ?? printable(`${place(file, keyPath)}${text}`));
    this.name = 'SurveyError';
    this.code = code;
    this.file = file;
    this.keyPath = keyPath;
    this.text = text;
  }
}

/** "<file>: <key>: " with the empty parts left out ("" when both are). */
function place(file: string, keyPath: string): string {
  const where = [file, keyPath].filter((s) => s.length > 0).join(': ');
  return where ? `${where}: ` : '';
}

/**
 * Build the one clear sentence: "<file>: <key>: <what is wrong>; <what to do>."
 * `what` and `fix` are plain phrases without a trailing full stop.
 */
export function inputError(code: ErrorCode, file: string, keyPath: string, what: string, fix?: string): SurveyError {
  return new SurveyError(code, file, keyPath, `${what}${fix ? `; ${fix}` : ''}.`);
}

/**
 * Text safe to print on a terminal as one line: control characters (C0, DEL, C1), line and
 * paragraph separators and the bidirectional overrides are written as escapes (\n, \t, \x1b,
 * \u202e), so nothing read from a file or a path can move the cursor, colour the terminal or
 * start a new line.
 */
export function printable(text: string): string {
  // eslint-disable-next-line no-control-regex -- the control characters are what is escaped here
  return text.replace(/[\u0000-\u001f\u007f-\u009f\u2028\u2029\u200e\u200f\u202a-\u202e\u2066-\u2069]/g, (c) => {
    if (c === '\n') return '\\n';
    if (c === '\r') return '\\r';
    if (c === '\t') return '\\t';
    const n = c.charCodeAt(0);
    return n < 0x100 ? `\\x${n.toString(16).padStart(2, '0')}` : `\\u${n.toString(16).padStart(4, '0')}`;
  });
}

/**
 * A short excerpt of something read (a line of a table, a value of a file) to quote in a message:
 * at most `max` characters, escaped with `printable`.
 */
export function excerpt(text: string, max = 40): string {
  const chars = Array.from(text);
  const cut = chars.length > max ? chars.slice(0, max - 3).join('') + '...' : text;
  return printable(cut);
}

/** Throw a SurveyError (code not_finite) unless every number in `values` is finite. */
export function assertFinite(file: string, keyPath: string, what: string, ...values: number[]): void {
  for (const v of values) {
    if (!Number.isFinite(v)) {
      throw inputError(
        'not_finite',
        file,
        keyPath,
        `${what} is not a finite number`,
        'check the model parameters and limits',
      );
    }
  }
}

/**
 * Refuse a library option (`forecast(survey, {mocks})`, `predict(survey, {model: {draws}})`) that
 * is not a whole number from min to max, as the command line refuses its flag: a function of plain
 * values takes them from scripts, where a typo is as likely as on a command line.
 */
export function assertWholeOption(value: unknown, option: string, min: number, max: number): void {
  if (value === undefined) return;
  if (typeof value === 'number' && Number.isInteger(value) && value >= min && value <= max) return;
  throw inputError(
    'bad_option',
    '',
    option,
    `is ${typeof value === 'number' ? String(value) : `a ${typeof value}`}, not a whole number from ${min} to ${max}`,
    `give ${option} a whole number in that range`,
  );
}
