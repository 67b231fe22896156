/* Generated from specs/forecast.schema.json by scripts/generate-output-types.ts: do not edit (run `npx tsx scripts/generate-output-types.ts`). */
import type { Warning } from '../../warnings.js';
import type { CosmologyBlock, ModelDescription, RedshiftRange } from './shared.js';

export type Matrix = number[][];

/**
 * JSON printed by `skytally forecast FILE --format json`. Parameters are constant offsets applied at every z to log10 phi*, log10 L* (luminosity variable) or M* (magnitude variable), and alpha. No number is NaN or Infinity.
 */
export interface Forecast {
  format: 1;
  title: string;
  cosmology: CosmologyBlock;
  model: ModelDescription;
  /**
   * A forecast is only as good as the luminosity function assumed.
   */
  caveat: string;
  area_deg2: number;
  redshift: RedshiftRange;
  /**
   * Parameter names in the order of every matrix.
   *
   * @minItems 3
   * @maxItems 3
   */
  parameters: ('log10_phi_star' | 'log10_l_star' | 'm_star' | 'alpha')[];
  center: ByParameter;
  /**
   * Expected number of detected sources of the population.
   */
  count: number;
  /**
   * false with --no-cosmic-variance: then fisher is the Poisson-only result.
   */
  cosmic_variance: boolean;
  slices: ForecastSlice[];
  fisher: FisherBlock;
  covariance: Matrix;
  fisher_poisson_only: FisherBlock;
  mocks?: MocksBlock;
  model_spread?: ForecastModelSpread;
  requirement?: Requirement;
  /**
   * Present when the file holds several populations and none was chosen (forecast --population, or the report): the names of those not forecast; the first population is, and model names it.
   *
   * @minItems 1
   */
  populations_left_out?: string[];
  /**
   * What the reader should know although nothing stopped the work (also printed on stderr, one line each); empty when there is nothing to say.
   */
  warnings: Warning[];
}
export interface ByParameter {
  [k: string]: number;
}
export interface ForecastSlice {
  z_min: number;
  z_max: number;
  count: number;
  /**
   * The slice's cosmic-variance fraction: the width of its normalisation nuisance.
   */
  cosmic_variance_fraction?: number;
}
export interface FisherBlock {
  sigma: ByParameter;
  correlation: Matrix;
  covariance: Matrix;
}
export interface MocksBlock {
  count: number;
  seed: number;
  estimator: 'extended_likelihood' | 'sty';
  parameters: {
    [k: string]: MockParameterSummary;
  };
  /**
   * Parameters the estimator cannot measure (log10_phi_star for sty).
   */
  not_constrained: string[];
  failed_fits: number;
  mean_sources: number;
  notes: string[];
  /**
   * With --list-mock-fits: one row per converged mock fit, the fitted values in the order of "parameters"; null for a parameter the estimator does not constrain.
   */
  fits?: (number | null)[][];
}
export interface MockParameterSummary {
  mean: number;
  std: number;
  p16: number;
  p50: number;
  p84: number;
  /**
   * mean - input
   */
  bias: number;
  /**
   * (mean - input) / (std / sqrt(successful fits))
   */
  bias_in_standard_errors: number;
}
/**
 * The Fisher sigmas recomputed at each draw of the population's model_uncertainty (constant offsets to log10 phi*, log10 L* or M*, alpha at every redshift), on the survey's one density grid, with the assumed model's cosmic-variance fractions; percentiles linear between order statistics (Hyndman & Fan type 7).
 */
export interface ForecastModelSpread {
  /**
   * Draws whose Fisher matrix is not singular (the percentiles' sample).
   */
  draws: number;
  /**
   * The --seed of the normal draws (the same seed as predict's --seed gives predict's draws).
   */
  seed: number;
  /**
   * normal: drawn from the sigmas and correlations; draws_file: every row of the file once.
   */
  source: 'normal' | 'draws_file';
  /**
   * Per parameter, p16, p50 and p84 of the draws' sigmas with the cosmic-variance nuisances marginalised (Poisson only with --no-cosmic-variance).
   */
  sigma: {
    [k: string]: SigmaPercentiles;
  };
  /**
   * The same, Poisson only.
   */
  sigma_poisson_only: {
    [k: string]: SigmaPercentiles;
  };
  /**
   * Draws left out because their Fisher matrix is singular.
   */
  failed_draws: number;
  notes: string[];
}
export interface SigmaPercentiles {
  p16: number;
  p50: number;
  p84: number;
}
export interface Requirement {
  target: ByParameter;
  /**
   * Area reaching every target at the survey's depth (the largest needed); null if some target cannot be reached by area.
   */
  area_deg2: number | null;
  /**
   * Limit reaching every target at the survey's area (the deepest needed), in limit_variable; null if some target cannot be reached.
   */
  limit: number | null;
  /**
   * Present only when the survey file gave detection.limit as a flux density: the unit it was written in. The limits stay AB magnitudes here; the human outputs quote them in this unit too (f_nu = 3631 Jy 10^(-0.4 m)).
   */
  limit_unit?: 'Jy' | 'mJy' | 'uJy' | 'nJy' | 'erg/s/cm^2/Hz' | 'W/m^2/Hz';
  /**
   * Present only when the survey file gave detection.limit as a velocity-integrated flux: the Jy km/s of one erg/s/cm^2 at detection.line's rest frequency, c / nu = 1e10 lambda_line [Angstrom]. The limits stay line fluxes here; the human outputs quote them in Jy km/s too.
   */
  limit_jy_km_s_per_cgs?: number;
  /**
   * log10_quantity and absolute_magnitude (threshold kind) give the limit at the window's middle; a redshift-dependent limit is moved by a constant.
   */
  limit_variable: 'line_flux_cgs' | 'apparent_magnitude' | 'log10_quantity' | 'absolute_magnitude';
  by_parameter: {
    [k: string]: RequirementEntry;
  };
  search: {
    /**
     * @minItems 2
     * @maxItems 2
     */
    area_deg2: number[];
    /**
     * Shallowest and deepest limit searched.
     *
     * @minItems 2
     * @maxItems 2
     */
    limit: number[];
  };
  notes: string[];
  model?: RequirementModel;
}
export interface RequirementEntry {
  target: number;
  area_deg2: number | null;
  limit: number | null;
  /**
   * Why a null: beyond the full sky, a cosmic-variance floor, or outside the searched limits.
   */
  notes: string[];
}
/**
 * With --model-draws: the area and limit needed under the model's own uncertainty. p50: the target met at the median of the draws' sigmas (half the draws); p84: at their 84th percentile (84% of the draws: the pessimistic case).
 */
export interface RequirementModel {
  draws: number;
  p50: RequirementAtModel;
  p84: RequirementAtModel;
}
export interface RequirementAtModel {
  /**
   * Area reaching every target at the survey's depth in this share of the draws; null if some target cannot be reached by area.
   */
  area_deg2: number | null;
  /**
   * Limit reaching every target at the survey's area in this share of the draws, in limit_variable; null if some target cannot be reached.
   */
  limit: number | null;
  by_parameter: {
    [k: string]: RequirementEntry;
  };
  notes: string[];
}
