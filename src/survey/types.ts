/**
 * The normalised survey: plain numbers in documented units (names carry the unit).
 * Produced by `loadSurvey` (src/survey/load.ts); consumed by every computation.
 * Nothing downstream of this type knows about YAML, units strings or expressions.
 */

/** A parameter that may vary with redshift: a number, a table in z, or a safe expression in z. */
export interface ZParam {
  /** What the file said, for display: a number, {table: [[z, v], ...]} or the expression text. */
  readonly source: number | { table: [number, number][] } | string;
  /** True when the value does not depend on z. */
  readonly constant: boolean;
  /** Value at redshift z (finite for every z in the survey window; checked at load time). */
  at(z: number): number;
}

export interface Cosmology {
  /** Name of the preset the values started from, if any (e.g. "planck2018"). */
  preset?: string;
  /** Where the preset's numbers were published. */
  presetSource?: string;
  h0: number; // km/s/Mpc
  omegaM: number; // matter density today
  omegaLambda: number; // 1 - omegaM - omegaR (flat)
  omegaR: number; // photons + 3.046 massless neutrinos; 0 when tCmb = 0
  tCmb: number; // K; 0 = no radiation
  omegaB: number; // baryons (for the transfer function)
  sigma8: number;
  nS: number;
}

export type FilterProfile = 'tophat' | 'gaussian';

export interface Filter {
  centerAngstrom: number;
  fwhmAngstrom: number;
  profile: FilterProfile;
}

export type Completeness =
  | { model: 'logistic'; half: number; width: number } // half, width in the completeness variable x
  | { model: 'table'; x: number[]; fraction: number[] }; // x ascending in the completeness variable

/**
 * The completeness variable x (survey-file.md): observed AB magnitude (magnitude kind),
 * -log10(measured line flux / erg s^-1 cm^-2) (line_flux kind; a half given as a flux is stored
 * as -log10 of it, and table x as -log10 flux, sorted ascending), log10 quantity or absolute
 * magnitude (threshold kind). Completeness falls as x grows in every kind.
 */
export type Detection =
  | {
      kind: 'line_flux';
      limitCgs: number; // erg s^-1 cm^-2, faintest line flux counted (at peak transmission)
      lineAngstrom?: number; // default rest wavelength when a population gives none
      filter?: Filter;
      completeness?: Completeness;
    }
  | {
      kind: 'magnitude';
      limitMag: number; // apparent AB magnitude
      bandAngstrom: number; // effective wavelength of the band
      beta: number; // f_lambda ~ lambda^beta
      completeness?: Completeness;
    }
  | {
      kind: 'threshold';
      limit: ZParam; // log10 quantity (luminosity variable) or absolute magnitude (magnitude variable)
      completeness?: Completeness;
    };

export type DetectionKind = Detection['kind'];

export type PopulationVariable = 'luminosity' | 'magnitude';

export interface SchechterPopulation {
  name: string;
  shape: 'schechter';
  variable: PopulationVariable;
  /** Free-text label of the quantity (threshold kind), e.g. "stellar mass [Msun]". */
  quantity?: string;
  /** Normalisation of the standard form, Mpc^-3 (per_dex inputs already divided by ln 10). */
  phiStar: ZParam;
  /** Characteristic luminosity (erg/s, or the quantity's unit for threshold); luminosity variable. */
  lStar?: ZParam;
  /** Characteristic absolute AB magnitude; magnitude variable. */
  mStar?: ZParam;
  alpha: ZParam;
  /** Rest wavelength of the emission line (line_flux kind), Angstrom. */
  lineAngstrom?: number;
  /** Rest wavelength at which absolute magnitudes are defined (magnitude kind), Angstrom. */
  restWavelengthAngstrom: number;
  /** "auto" or a value (number, table, expression) of the galaxy bias. */
  bias: 'auto' | ZParam;
  /** Fraction (0, 1] of haloes above the matched mass hosting a detected galaxy. */
  occupation: number;
  /** The redshift window in which this population is counted (survey window, cut by the filter). */
  window: { min: number; max: number };
}

export type Population = SchechterPopulation;

export interface Survey {
  format: 1;
  /** Path of the file the survey came from ("" when built in code). */
  file: string;
  title: string;
  cosmology: Cosmology;
  areaDeg2: number;
  areaSr: number;
  /** The window the slices cover. */
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
}
