/**
 * Every size skytally accepts has a stated cap, and every parameter a physical range. The loader
 * refuses anything outside them with one sentence (exit status 2) before any work starts, so that
 * no file can make the program run for long or exhaust memory, and no value reaches a computation
 * in which it has no meaning. README.md ("Limits") lists the same numbers for users.
 *
 * The ranges are wide: they hold every survey and population in the literature many times over
 * (common practice; the values are chosen, not measured), and keep the integrals finite.
 */

/** Sizes. */
export const CAPS = {
  /** Redshift slices of one survey ({count}, {width} or {edges}). */
  slices: 1000,
  /** Populations of one survey. */
  populations: 20,
  /** Slices times populations: each population is counted over every slice. */
  sliceResults: 2000,
  /** Histogram bins in one slice (the observed range over the bin width). */
  histogramBins: 1000,
  /** Rows of a table in a survey file ({table: ...} parameters, completeness tables). */
  tableRows: 1000,
  /** Characters of any text value in a survey file (titles, names, unit strings are shorter). */
  textLength: 1000,
} as const;

/** Most model draws one forecast may recompute its Fisher matrix for (--model-draws). */
export const MAX_FORECAST_MODEL_DRAWS = 10_000;

/** Most mock surveys one run may draw (about 20 ms each on one core for a deep field). */
export const MAX_MOCKS = 10_000;

/** Largest seed of the mock surveys and model draws: the 32-bit seeds of the Mersenne twister (mt19937). */
export const MAX_SEED = 4294967295;

/** Narrowest redshift slice and window: thinner boxes have no measurable depth. */
export const MIN_SLICE_WIDTH = 1e-6;

/** Highest redshift a survey window may reach (galaxies form after z ~ 30). */
export const MAX_REDSHIFT = 30;

export interface Range {
  min: number;
  max: number;
  /** Unit in messages ('' for none). */
  unit: string;
}

/** Physical ranges of the survey-file values (in the units the loader stores them in). */
export const RANGES = {
  /** Faint-end slope (alpha, alpha_1, alpha_2). */
  alpha: { min: -4, max: 4, unit: '' },
  /** Normalisation phi*, Mpc^-3 (after the log10_ and _dex forms are converted). */
  phiStar: { min: 1e-30, max: 1e3, unit: 'Mpc^-3' },
  /** Characteristic luminosity or quantity L* (erg/s, or the quantity's own unit). */
  lStar: { min: 1e-30, max: 1e60, unit: '' },
  /** Characteristic absolute AB magnitude M*. */
  mStar: { min: -40, max: 10, unit: 'AB mag' },
  /** Galaxy bias. */
  bias: { min: 1e-3, max: 100, unit: '' },
  /** Apparent AB magnitude limit (and completeness points of a magnitude survey). */
  apparentMagnitude: { min: 0, max: 40, unit: 'AB mag' },
  /** Line-flux limit (and completeness points of a line_flux survey), erg/s/cm^2. */
  lineFlux: { min: 1e-30, max: 1e-5, unit: 'erg/s/cm^2' },
  /** Threshold limit for a luminosity-like variable: log10 of the quantity. */
  log10Quantity: { min: -30, max: 60, unit: 'dex' },
  /** Threshold limit for a magnitude variable: absolute AB magnitude. */
  absoluteMagnitude: { min: -40, max: 10, unit: 'AB mag' },
  /** Logistic completeness width (mag or dex). */
  completenessWidth: { min: 1e-3, max: 5, unit: '' },
  /** Spectral slope beta (f_lambda ~ lambda^beta). */
  beta: { min: -5, max: 5, unit: '' },
  /**
   * Rest or observed wavelengths (line, band, rest_wavelength, filter center and fwhm), Angstrom: up
   * to 10 m, so that a band given as a frequency reaches down to 30 MHz.
   */
  wavelength: { min: 1, max: 1e11, unit: 'Angstrom' },
  /** Histogram bin width (mag or dex). */
  histogramWidth: { min: 0.01, max: 5, unit: '' },
  /** Width/height of each field. */
  fieldAspect: { min: 1e-3, max: 1e3, unit: '' },
  /** Number of independent fields. */
  fieldCount: { min: 1, max: 10_000, unit: '' },
  /** Exposure time of the whole survey, hours. */
  exposureHours: { min: 1e-6, max: 1e6, unit: 'h' },
  /** A star-formation-rate factor, Msun/yr per erg/s (or per erg/s/Hz). */
  sfrFactor: { min: 1e-60, max: 1e10, unit: '' },
  /** A fraction kept by a selection (redshift_selection, equivalent-width fractions). */
  fraction: { min: 0, max: 1, unit: '' },
  /** Flux of blended neighbouring lines relative to the line. */
  blendRatio: { min: 0, max: 10, unit: '' },
  /** Dust attenuation. */
  attenuation: { min: 0, max: 20, unit: 'mag' },
  /** A rest-frame or observed equivalent width (a cut may be 0). */
  equivalentWidth: { min: 0, max: 1e5, unit: 'Angstrom' },
  /** Width of a lognormal equivalent-width distribution. */
  sigmaDex: { min: 1e-3, max: 5, unit: 'dex' },
} as const satisfies Record<string, Range>;

/** "from -4 to 4", "from 1e-30 to 1e-5 erg/s/cm^2". */
export function describeRange(r: Range): string {
  return `from ${r.min} to ${r.max}${r.unit ? ` ${r.unit}` : ''}`;
}

/** True when v lies in the range (ends included); false for NaN. */
export function inRange(v: number, r: Range): boolean {
  return v >= r.min && v <= r.max;
}
