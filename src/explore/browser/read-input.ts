/**
 * The page's stand-in for src/survey/read-input.ts (scripts/explore-bundle.mjs puts it in that
 * module's place in the page bundle): the page has no file system, so the files the survey reads
 * (transmission tables) come from the texts the command embedded in the page, by path. Same
 * exports and messages as the module it replaces.
 */
import { inputError } from '../../errors.js';
import {
  MAX_SURVEY_BYTES,
  MAX_TABLE_BYTES,
  type InputFile,
  type InputText,
  type ReadInputOptions,
} from '../../survey/input-limits.js';

export { MAX_SURVEY_BYTES, MAX_TABLE_BYTES, type InputFile, type InputText, type ReadInputOptions };

/** The embedded files, by the path the loader asks for. */
export const embeddedFiles = new Map<string, string>();

export function readInputText(path: string, opts: ReadInputOptions): InputText {
  const text = embeddedFiles.get(path);
  if (text === undefined) {
    throw inputError(
      'file_unreadable',
      opts.file,
      opts.keyPath,
      `${opts.subject} is not in this page (the page holds only the files the survey named when it was made)`,
      'write the survey file and run skytally explore on it again',
    );
  }
  return { path, text, dev: 0, ino: 0 };
}
