/**
 * Synthetic photometry of the magnitude kind: a rest-frame spectrum seen through the survey's band
 * (k-corrections after Hogg et al. 2002, arXiv:astro-ph/0210394; src/selection/kcorrection.ts), the
 * rest frame in which absolute magnitudes are defined, and the magnitude systems.
 */
import type { Filter } from './detection.js';

/** Magnitudes as the file gives them: AB, or Vega with the band's offset m_AB = m_Vega + vegaToAb. */
export type MagnitudeSystem = 'ab' | 'vega';

/** How a limit or M* was given; the model holds AB magnitudes only (converted once by the loader). */
export interface MagnitudeSystemGiven {
  system: MagnitudeSystem;
  /** m_AB - m_Vega in the band concerned (0 for AB). */
  vegaToAb: number;
}

/**
 * A rest-frame spectrum read from a CSV file (src/survey/spectrum-file.ts): wavelengths in
 * Angstrom, strictly increasing; f_lambda in any unit (only ratios enter), 0 or more, linear
 * between rows and never extrapolated.
 */
export interface Spectrum {
  /** The file as written in the survey (relative to the survey file). */
  file: string;
  wavelengthAngstrom: number[];
  fLambda: number[];
}

/**
 * detection.sed: apparent magnitudes by synthetic photometry of `spectrum` through `band` (top-hat,
 * gaussian untruncated, or a tabulated curve), replacing the power-law colour term.
 */
export interface SedPhotometry {
  spectrum: Spectrum;
  band: Filter;
  /** The survey file (for a message naming detection.sed when a redshift needs more of the spectrum). */
  surveyFile: string;
}

/** Where absolute magnitudes are defined: AB at one rest wavelength, or AB in a rest-frame band. */
export type RestFrame = { kind: 'wavelength'; angstrom: number } | { kind: 'band'; band: Filter };
