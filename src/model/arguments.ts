/**
 * The library's entry points check the kind of their arguments first: a survey file's path, its
 * text or the object YAML gives, where a loaded `Survey` is taken, is refused with a SurveyError
 * (code wrong_type) in one sentence saying how to load it, instead of a TypeError from deep inside
 * the computation ("Cannot destructure property 'h0' of 'c' as it is undefined"). The checks
 * read a few fields; they do not validate a survey (the loader does).
 */
import { excerpt, inputError, type SurveyError } from '../errors.js';
import type { Survey } from './survey.js';

/** What a value is, in words: "a string", "undefined", "an array", "an object". */
function kindOf(v: unknown): string {
  if (v === undefined) return 'undefined';
  if (v === null) return 'null';
  if (Array.isArray(v)) return 'an array';
  const t = typeof v;
  return t === 'object' ? 'an object' : `${/^[aeiou]/.test(t) ? 'an' : 'a'} ${t}`;
}

function isRecord(v: unknown): v is Record<string, unknown> {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

/** The fields every computation reads first, and what each must be. */
const SURVEY_FIELDS: [string, (v: unknown) => boolean][] = [
  ['cosmology', isRecord],
  ['detection', (v) => isRecord(v) && typeof v.kind === 'string'],
  ['populations', (v) => Array.isArray(v) && v.length > 0 && v.every(isRecord)],
  ['redshift', isRecord],
  ['sliceEdges', Array.isArray],
];

const LOADED_BY = 'a survey from loadSurveyFile(path), loadSurveyText(text, file) or parseSurveyObject(object, file)';

/** Why `v` is not a loaded survey ("a string", "an object without cosmology"), or undefined when it is one. */
function notASurvey(v: unknown): string | undefined {
  if (!isRecord(v)) return kindOf(v);
  const missing = SURVEY_FIELDS.find(([key, ok]) => !ok(v[key]));
  if (!missing) return undefined;
  // a survey file's contents as YAML gives them: keys of the file, none of the loaded survey
  const asWritten = ['area', 'population', 'populations', 'cosmology', 'detection'].some((k) => k in v);
  return asWritten && !('sliceEdges' in v)
    ? "a survey file's contents as written"
    : missing[0] in v
      ? `an object whose ${missing[0]} is not a loaded survey's (${kindOf(v[missing[0]])})`
      : `an object without ${missing[0]}`;
}

/** How to load what was given instead. */
function loadHint(v: unknown, call: (arg: string) => string): string {
  if (typeof v === 'string') return `load the file first: ${call(`loadSurveyFile("${excerpt(v)}")`)}`;
  if (isRecord(v) && notASurvey(v) === "a survey file's contents as written")
    return `check them with parseSurveyObject first: ${call('parseSurveyObject(object, "my-survey.yaml")')}`;
  return `load one first, e.g. ${call('loadSurveyFile("samples/halpha-narrowband.yaml")')}`;
}

/** A SurveyError when `value`, the survey argument of `caller`, is not a loaded survey. */
export function surveyArgumentError(value: unknown, caller: string): SurveyError | undefined {
  const not = notASurvey(value);
  if (not === undefined) return undefined;
  return inputError(
    'wrong_type',
    '',
    '',
    `${caller} takes ${LOADED_BY}, not ${not}`,
    loadHint(value, (arg) => `${caller}(${arg})`),
  );
}

/** Refuse anything but a loaded survey as the survey argument of `caller` (a library entry point). */
export function checkSurvey(value: unknown, caller: string): asserts value is Survey {
  const e = surveyArgumentError(value, caller);
  if (e) throw e;
}

/** Refuse anything but a list of loaded surveys (compare). */
export function checkSurveyList(value: unknown, caller: string): asserts value is Survey[] {
  if (!Array.isArray(value)) {
    const single = notASurvey(value) === undefined;
    throw inputError(
      'wrong_type',
      '',
      '',
      `${caller} takes a list of surveys (each ${LOADED_BY}), not ${single ? 'one survey' : kindOf(value)}`,
      `give them as an array: ${caller}([loadSurveyFile("a.yaml"), loadSurveyFile("b.yaml")])`,
    );
  }
  value.forEach((s: unknown, i) => {
    const not = notASurvey(s);
    if (not !== undefined)
      throw inputError(
        'wrong_type',
        '',
        `surveys[${i}]`,
        `${caller} takes a list of surveys (each ${LOADED_BY}), but this one is ${not}`,
        loadHint(s, (arg) => `${caller}([..., ${arg}])`),
      );
  });
}

/** Refuse options that are not an object (undefined is taken as no options). */
export function checkOptions(value: unknown, caller: string, example: string): void {
  if (value === undefined || isRecord(value)) return;
  throw inputError(
    'wrong_type',
    '',
    'options',
    `${caller} takes its options as an object, not ${kindOf(value)}`,
    `e.g. ${caller}(survey, ${example}), or leave them out`,
  );
}

/** Refuse anything but {text: string} (and an optional object) as the survey source of `caller` (exploreCompute). */
export function checkSource(value: unknown, caller: string): asserts value is { text: string } {
  if (isRecord(value) && typeof value.text === 'string') return;
  throw inputError(
    'wrong_type',
    '',
    '',
    `${caller} takes the survey file's text as {text: string}, not ${isRecord(value) ? `an object whose text is ${kindOf(value.text)}` : kindOf(value)}`,
    `e.g. ${caller}({ text: readFileSync("my-survey.yaml", "utf8") }, "my-survey.yaml", ".")`,
  );
}

/** Refuse anything but a string as `caller`'s argument `what` ("the path of a survey file"). */
export function checkText(value: unknown, caller: string, what: string, example: string): asserts value is string {
  if (typeof value === 'string') return;
  const fix =
    isRecord(value) && notASurvey(value) === undefined
      ? `this is already a loaded survey: give it to predict, forecast, plan or compare as it is`
      : isRecord(value)
        ? `for the contents of a survey file as an object, use parseSurveyObject(object, "my-survey.yaml")`
        : `e.g. ${caller}(${example})`;
  throw inputError('wrong_type', '', '', `${caller} takes ${what}, not ${kindOf(value)}`, fix);
}
