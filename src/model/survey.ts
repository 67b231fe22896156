/**
 * The normalised survey: plain numbers in documented units (names carry the unit).
 * Produced by `loadSurvey` (src/survey/load.ts); consumed by every computation.
 * Nothing downstream of this type knows about YAML, units strings or expressions.
 */

import type { Cosmology } from './cosmology.js';
import type { Detection } from './detection.js';
import type { Population } from './population.js';

export interface Survey {
  format: 1;
  /** Path of the file the survey came from ("" when built in code). */
  file: string;
  title: string;
  cosmology: Cosmology;
  areaDeg2: number;
  areaSr: number;
  /** The window the slices cover: the first population's window, or the span of explicit edges. */
  redshift: { min: number; max: number };
  field: { aspect: number; count: number };
  detection: Detection;
  populations: Population[];
  /** Slice edges, ascending, covering `redshift` exactly. */
  sliceEdges: number[];
  /** Histogram bin width in the histogram variable (mag or dex). */
  histogramWidth: number;
  /** Exposure time of the whole survey, hours, when given. */
  exposureHours?: number;
  /** The parsed file as written (for reports). */
  raw: unknown;
  /**
   * Every file read to build the survey (the survey file first, then transmission files), with
   * its identity: outputs are compared with these so that no output replaces an input.
   */
  inputs?: InputFile[];
}

/** A file that was read, identified by device and inode (links resolved). */
export interface InputFile {
  path: string;
  dev: number;
  ino: number;
}
