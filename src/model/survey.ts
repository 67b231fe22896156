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

export type FilterProfile = 'tophat' | 'gaussian' | 'table';

/**
 * A tabulated transmission curve read from a CSV file (src/survey/transmission-file.ts):
 * wavelengths in Angstrom, strictly increasing; transmission relative to its peak (max 1),
 * linear between rows and 0 outside the table.
 */
export interface TransmissionTable {
  /** The file as written in the survey (relative to the survey file). */
  file: string;
  wavelengthAngstrom: number[];
  transmission: number[];
}

export interface Filter {
  /** tophat/gaussian: as given. table: the transmission-weighted mean wavelength. */
  centerAngstrom: number;
  /** tophat/gaussian: as given. table: the distance between the outermost half-peak crossings. */
  fwhmAngstrom: number;
  profile: FilterProfile;
  /** The curve, for profile table. */
  table?: TransmissionTable;
}

/** Intergalactic attenuation applied to magnitude surveys. */
export type IgmModel = 'none' | 'madau1995';

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
      bandAngstrom: number; // effective wavelength of the band (from band_file when band is not given)
      beta: number; // f_lambda ~ lambda^beta
      igm: IgmModel; // default 'none'
      bandTable?: TransmissionTable; // detection.band_file: the band's transmission curve
      completeness?: Completeness;
    }
  | {
      kind: 'threshold';
      limit: ZParam; // log10 quantity (luminosity variable) or absolute magnitude (magnitude variable)
      completeness?: Completeness;
    };

export type DetectionKind = Detection['kind'];

export type PopulationVariable = 'luminosity' | 'magnitude';

/** One Schechter component's parameters (a double Schechter function has two sharing L* or M*). */
export interface ComponentParams {
  /** Normalisation of the standard form, Mpc^-3 (per_dex inputs already divided by ln 10). */
  phiStar: ZParam;
  alpha: ZParam;
}

/**
 * Star-formation-rate conversion of the population's luminosity (Kennicutt 1998, ARA&A 36, 189):
 * halpha 7.9e-42, oii 1.4e-41 (Msun/yr per erg/s), uv 1.4e-28 (Msun/yr per erg/s/Hz), or a factor.
 */
export interface SfrConversion {
  name: 'halpha' | 'oii' | 'uv' | 'factor';
  /** Msun/yr per unit of the luminosity-density unit (erg/s, or erg/s/Hz for a magnitude variable). */
  factor: number;
}

export interface SchechterPopulation {
  name: string;
  /** schechter: one component; double_schechter: two components sharing L* (or M*). */
  shape: 'schechter' | 'double_schechter';
  variable: PopulationVariable;
  /** Free-text label of the quantity (threshold kind), e.g. "stellar mass [Msun]". */
  quantity?: string;
  /** The first component's normalisation (the only one for shape schechter), Mpc^-3. */
  phiStar: ZParam;
  /** Every component, in order (one for schechter, two for double_schechter). */
  components: ComponentParams[];
  /** Characteristic luminosity (erg/s, or the quantity's unit for threshold); luminosity variable. */
  lStar?: ZParam;
  /** Characteristic absolute AB magnitude; magnitude variable. */
  mStar?: ZParam;
  /** The first component's faint-end slope (the only one for shape schechter). */
  alpha: ZParam;
  /** Rest wavelength of the emission line (line_flux kind), Angstrom. */
  lineAngstrom?: number;
  /** Rest wavelength at which absolute magnitudes are defined (magnitude kind), Angstrom. */
  restWavelengthAngstrom: number;
  /** "auto" or a value (number, table, expression) of the galaxy bias. */
  bias: 'auto' | ZParam;
  /** Fraction (0, 1] of haloes above the matched mass hosting a detected galaxy. */
  occupation: number;
  /**
   * The population's whole redshift window: the redshift key cut by where the filter sees its
   * line. Not cut by explicit slice edges (the slices then count only the part inside them).
   */
  window: { min: number; max: number };
  /**
   * Edges of this population's own result: the file's slices rule ({count}/{width}) applied to
   * its own window, or the survey's edges when the file gives edges.
   */
  sliceEdges: number[];
  /** sfr_conversion, when given. */
  sfrConversion?: SfrConversion;
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
