/**
 * Public entry points of the survey loader: YAML text in, a typed `Survey` of plain numbers out
 * (src/survey/types.ts), or exactly one SurveyError (src/errors.ts) with a stable code, the
 * file, the key path and one sentence saying what to change.
 */
import { readFileSync, statSync } from 'node:fs';
import { dirname } from 'node:path';
import { inputError } from '../errors.js';
import type { Survey } from './types.js';
import { MAX_FILE_BYTES, parseYaml } from './yaml.js';
import { normaliseSurvey } from './normalise.js';

function reason(e: unknown): string {
  const code = (e as { code?: string }).code;
  if (code === 'ENOENT') return 'there is no such file';
  if (code === 'EACCES' || code === 'EPERM') return 'permission to read it is denied';
  if (code === 'EISDIR') return 'it is a directory';
  return `it cannot be read (${code ?? (e as Error).message})`;
}

/** Read, parse and check a survey file (at most 1 MiB). */
export function loadSurveyFile(path: string): Survey {
  let text: string;
  try {
    const st = statSync(path);
    if (st.isDirectory()) throw Object.assign(new Error('directory'), { code: 'EISDIR' });
    if (st.size > MAX_FILE_BYTES) {
      throw inputError('file_too_large', path, '', `the file is ${st.size} bytes, more than the 1 MiB a survey file may have`, 'check that this is the right file');
    }
    text = readFileSync(path, 'utf8');
  } catch (e) {
    if (e instanceof Error && e.name === 'SurveyError') throw e;
    throw inputError('file_unreadable', path, '', reason(e), 'check the path and its permissions');
  }
  return loadSurveyText(text, path, dirname(path));
}

/**
 * Parse and check survey YAML. `file` names the source in messages. `baseDir` is the directory
 * relative paths in the file (detection.filter.file, detection.band_file) are resolved against;
 * default: the directory of `file`.
 */
export function loadSurveyText(text: string, file: string, baseDir?: string): Survey {
  return normaliseSurvey(parseYaml(text, file), file, baseDir);
}

/** Check and normalise an already-parsed survey object (as YAML or JSON would give it). */
export function parseSurveyObject(obj: unknown, file: string, baseDir?: string): Survey {
  return normaliseSurvey(obj, file, baseDir);
}
