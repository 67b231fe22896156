/**
 * Selection effects beyond the limit and the completeness (docs/survey-file.md, "Selection
 * effects"): a redshift selection, line blending, dust attenuation and an equivalent-width cut.
 */
import type { ZParam } from './zparam.js';

/** The equivalent-width cut of a line search: the smallest measured width kept, in the rest or the observed frame. */
export interface EquivalentWidthCut {
  frame: 'rest' | 'observed';
  angstrom: number;
}

/** A population's rest-frame equivalent-width distribution of its line (taken as independent of luminosity). */
export type EquivalentWidthDistribution =
  | { model: 'exponential'; scaleAngstrom: number }
  | { model: 'lognormal'; medianAngstrom: number; sigmaDex: number }
  | { model: 'table'; widthAngstrom: number[]; fractionAbove: number[] };

/** A line blended with a population's line: its rest wavelength and its flux relative to the line. */
export interface BlendedLine {
  restAngstrom: number;
  ratio: number;
}

/** What a detection adds to the selection (every kind). */
export interface DetectionSelection {
  /** Fraction in [0, 1] of sources at true z kept by the selection (a population's own wins). */
  redshiftSelection?: ZParam;
  /** line_flux only. */
  equivalentWidthCut?: EquivalentWidthCut;
}

/** What a population adds to the selection. */
export interface PopulationSelection {
  /** Fraction in [0, 1] of this population's sources at true z kept (wins over the detection's). */
  redshiftSelection?: ZParam;
  /**
   * Flux of unresolved neighbouring lines relative to the line (line_flux only; 0 when absent): a
   * number, or a table or an expression in z (the [NII]/H-alpha ratio falls with redshift).
   */
  blendRatio?: ZParam;
  /**
   * Unresolved neighbouring lines each at its own rest wavelength (Angstrom) with its flux ratio to
   * the line (line_flux only; never with blendRatio): each is seen at its own filter transmission.
   */
  blendedLines?: BlendedLine[];
  /** Dust attenuation in magnitudes (0 when absent); the luminosity function is intrinsic. */
  attenuation?: ZParam;
  /** Rest-frame equivalent widths of the line (needed with an equivalent-width cut). */
  equivalentWidths?: EquivalentWidthDistribution;
  /** Where the luminosity function was measured (warning only). */
  validRedshift?: { min: number; max: number };
}
