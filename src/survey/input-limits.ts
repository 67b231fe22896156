/**
 * What reading an input file takes and gives, shared by the reader (src/survey/read-input.ts) and
 * the page's stand-in for it (src/explore/browser/read-input.ts), which has no file system.
 */
import type { InputFile } from '../model/survey.js';

export type { InputFile };

export interface InputText extends InputFile {
  text: string;
}

export interface ReadInputOptions {
  /** Largest size accepted, bytes. */
  maxBytes: number;
  /** What the limit is called in the message, e.g. "256 KiB". */
  maxLabel: string;
  /** The file named at the start of a message (the survey file when it names this one). */
  file: string;
  /** The survey key that names this file ('' for the survey file itself). */
  keyPath: string;
  /** The grammatical subject of the sentence: "the file", "the transmission file \"x.csv\"". */
  subject: string;
  /** What to do when the file cannot be found or read. */
  fix: string;
}

/** Largest survey file read, bytes (256 KiB: a survey file is a few lines). */
export const MAX_SURVEY_BYTES = 256 * 1024;
/** Largest table file read (transmission curves), bytes (1 MiB). */
export const MAX_TABLE_BYTES = 1024 * 1024;
