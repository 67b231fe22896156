/**
 * Public entry points of the survey loader: YAML text in, a typed `Survey` of plain numbers out
 * (src/model/), or exactly one SurveyError (src/errors.ts) with a stable code, the
 * file, the key path and one sentence saying what to change.
 */
import { dirname } from 'node:path';
import type { InputFile, Survey } from '../model/survey.js';
import { parseYaml } from './yaml.js';
import { normaliseSurvey } from './normalise.js';
import { MAX_SURVEY_BYTES, readInputText } from './read-input.js';
import { checkText } from '../model/arguments.js';

/** Read a survey file as text (a regular UTF-8 file of at most 256 KiB), with its identity. */
export function readSurveyText(path: string): { text: string; input: InputFile } {
  const r = readInputText(path, {
    maxBytes: MAX_SURVEY_BYTES,
    maxLabel: '256 KiB a survey file may have',
    file: path,
    keyPath: '',
    subject: 'the file',
    fix: 'check the path and its permissions',
  });
  return { text: r.text, input: { path: r.path, dev: r.dev, ino: r.ino } };
}

/** Read, parse and check a survey file; also returns the text as written. */
export function loadSurveyFileWithText(path: string): { survey: Survey; text: string } {
  const { text, input } = readSurveyText(path);
  const survey = loadSurveyText(text, path, dirname(path));
  survey.inputs = [input, ...(survey.inputs ?? [])];
  return { survey, text };
}

/** Read, parse and check a survey file (at most 256 KiB). */
export function loadSurveyFile(path: string): Survey {
  checkText(path, 'loadSurveyFile', 'the path of a survey file', '"samples/halpha-narrowband.yaml"');
  return loadSurveyFileWithText(path).survey;
}

/**
 * Parse and check survey YAML. `file` names the source in messages. `baseDir` is the directory
 * relative paths in the file (detection.filter.file, detection.band_file) are resolved against;
 * default: the directory of `file`.
 */
export function loadSurveyText(text: string, file: string, baseDir?: string): Survey {
  checkText(
    text,
    'loadSurveyText',
    'the text of a survey file',
    'readFileSync("my-survey.yaml", "utf8"), "my-survey.yaml"',
  );
  checkText(
    file,
    'loadSurveyText',
    'the name of the file as its second argument (for messages)',
    'text, "my-survey.yaml"',
  );
  return normaliseSurvey(parseYaml(text, file), file, baseDir);
}

/** Check and normalise an already-parsed survey object (as YAML or JSON would give it). */
export function parseSurveyObject(obj: unknown, file: string, baseDir?: string): Survey {
  checkText(
    file,
    'parseSurveyObject',
    'the name of the file as its second argument (for messages)',
    'object, "my-survey.yaml"',
  );
  return normaliseSurvey(obj, file, baseDir);
}
