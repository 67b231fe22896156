/** The assumed population: Schechter parameters that may vary with z, bias, window and slices. */
import type { BiasSource, ZParam } from './zparam.js';
import type { ModelUncertainty } from './model-uncertainty.js';
import type { Filter } from './detection.js';
import type { MagnitudeSystemGiven, SedPhotometry } from './photometry.js';
import type { PopulationSelection } from './selection.js';

export type PopulationVariable = 'luminosity' | 'magnitude';

/** One Schechter component's parameters (a double Schechter function has two sharing L* or M*). */
export interface ComponentParams {
  /** Normalisation of the standard form, Mpc^-3 (per_dex inputs already divided by ln 10). */
  phiStar: ZParam;
  alpha: ZParam;
  /** The normalisation key the file used for this component (phi_star_2, log10_phi_star_1_dex, ...). */
  phiKey?: string;
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

export interface SchechterPopulation extends PopulationSelection {
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
  /** The key the file gave L* under (l_star, or log10_l_star: lStar.source is then a log10). */
  lStarKey?: 'l_star' | 'log10_l_star';
  /** Characteristic absolute AB magnitude; magnitude variable. */
  mStar?: ZParam;
  /** The first component's faint-end slope (the only one for shape schechter). */
  alpha: ZParam;
  /** Rest wavelength of the emission line (line_flux kind), Angstrom. */
  lineAngstrom?: number;
  /** Rest wavelength at which absolute magnitudes are defined (magnitude kind), Angstrom; with restBand its center. */
  restWavelengthAngstrom: number;
  /** rest_band: absolute magnitudes are AB in this rest-frame band (needs detection.sed or the population's sed). */
  restBand?: Filter;
  /**
   * The population's own spectral slope beta (f_lambda ~ lambda^beta; magnitude kind without
   * detection.sed): replaces detection.beta in this population's k-correction. Absent: detection.beta.
   */
  beta?: number;
  /**
   * The population's own rest-frame spectrum (its sed key; magnitude kind, the band a shape):
   * replaces detection.sed or the power law in this population's k-correction. Absent: the detection's.
   */
  sed?: SedPhotometry;
  /** system vega: how m_star was given (mStar itself holds AB, converted once). */
  magnitudeSystem?: MagnitudeSystemGiven;
  /** True when rest_wavelength was left at its default (a warning checks it against the band). */
  restWavelengthDefault?: boolean;
  /** The normalisation key the file used (phi_star, log10_phi_star, phi_star_dex, ...; _1 for double). */
  normalisationKey?: string;
  /** "auto" or a value (number, table, expression, or B / D(z) from {over_growth: B}) of the galaxy bias. */
  bias: 'auto' | ZParam<BiasSource>;
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
  /** The luminosity function's own 1-sigma uncertainty (model_uncertainty), when given. */
  modelUncertainty?: ModelUncertainty;
}

export type Population = SchechterPopulation;

/** The three parameters a forecast or plan varies: constant offsets to log10 phi*, log10 L* (or M*) and alpha. */
export type ParameterName = 'log10_phi_star' | 'log10_l_star' | 'm_star' | 'alpha';

/** The parameters of a population's single Schechter function, in the order of every vector and matrix. */
export function parameterNames(p: Population): [ParameterName, ParameterName, ParameterName] {
  return ['log10_phi_star', p.variable === 'luminosity' ? 'log10_l_star' : 'm_star', 'alpha'];
}

/**
 * For a message refusing `name` as a parameter: when it names the knee of the other variable
 * (m_star where `names`, a population's parameterNames, hold log10_l_star; log10_l_star or l_star
 * where they hold m_star), " (a magnitude population's knee is m_star)"; otherwise "".
 */
export function otherKneeHint(name: string, names: readonly string[]): string {
  if (names.includes('log10_l_star') && name === 'm_star') return " (a luminosity population's knee is log10_l_star)";
  if (names.includes('m_star') && (name === 'log10_l_star' || name === 'l_star'))
    return " (a magnitude population's knee is m_star)";
  return '';
}
