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
 * The AB zero point: a source of f_nu = 3631 Jy has m_AB = 0. Oke & Gunn 1983 (ApJ 266, 713)
 * define m_AB = -2.5 log10 f_nu - 48.60 with f_nu in erg s^-1 cm^-2 Hz^-1, a zero point of
 * 10^(-48.60 / 2.5) erg s^-1 cm^-2 Hz^-1 = 3630.8 Jy; 3631 Jy is that value as written today (common
 * practice), 6.6e-5 mag from 48.60.
 */
export const AB_ZERO_POINT_JY = 3631;

/** The AB magnitude of a flux density in Jy: m = -2.5 log10(f_nu / 3631 Jy). */
export function abMagnitudeOfJy(jy: number): number {
  return -2.5 * Math.log10(jy / AB_ZERO_POINT_JY);
}

/** The flux density in Jy of an AB magnitude (the inverse of abMagnitudeOfJy). */
export function jyOfAbMagnitude(mag: number): number {
  return AB_ZERO_POINT_JY * 10 ** (-0.4 * mag);
}

/**
 * The unit a file wrote a flux-density limit in, kept so that the outputs quote limits in it
 * beside AB ("1.55 mJy (15.93 AB)"); the jansky with its prefixes, cgs or SI per Hz.
 */
export const FLUX_DENSITY_UNITS = ['Jy', 'mJy', 'uJy', 'nJy', 'erg/s/cm^2/Hz', 'W/m^2/Hz'] as const;
export type FluxDensityUnit = (typeof FLUX_DENSITY_UNITS)[number];

/** How many of `unit` make 1 Jy (1 Jy = 1e-23 erg s^-1 cm^-2 Hz^-1 = 1e-26 W m^-2 Hz^-1). */
export const UNITS_PER_JY: Record<FluxDensityUnit, number> = {
  Jy: 1,
  mJy: 1e3,
  uJy: 1e6,
  nJy: 1e9,
  'erg/s/cm^2/Hz': 1e-23,
  'W/m^2/Hz': 1e-26,
};

/** An AB magnitude as a flux density in `unit`: 3631 Jy 10^(-0.4 m), times the unit's count per Jy. */
export function fluxDensityOfAbMagnitude(mag: number, unit: FluxDensityUnit): number {
  return jyOfAbMagnitude(mag) * UNITS_PER_JY[unit];
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
 * detection.sed (or a population's own sed): apparent magnitudes by synthetic photometry of
 * `spectrum` through `band` (top-hat, gaussian untruncated, or a tabulated curve), replacing the
 * power-law colour term.
 */
export interface SedPhotometry {
  spectrum: Spectrum;
  band: Filter;
  /** The survey file (for a message naming detection.sed when a redshift needs more of the spectrum). */
  surveyFile: string;
  /** The key messages name: a population's own `populations[i].sed`; absent, detection.sed. */
  key?: string;
}

/** Where absolute magnitudes are defined: AB at one rest wavelength, or AB in a rest-frame band. */
export type RestFrame = { kind: 'wavelength'; angstrom: number } | { kind: 'band'; band: Filter };
