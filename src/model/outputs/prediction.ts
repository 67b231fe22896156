/* Generated from specs/prediction.schema.json by scripts/generate-output-types.ts: do not edit (run `npx tsx scripts/generate-output-types.ts`). */
import type { Warning } from '../../warnings.js';
import type { CompletenessBlock, CosmologyBlock, ModelDescription, RedshiftRange, ZTable } from './shared.js';

/**
 * Expected counts of detected sources: every population over its own window (populations), everything the survey detects (totals, their sum), broken down by redshift slice when every population is counted over the same redshifts, or by observed value when the windows differ (breakdown). Counts are expected numbers (not rounded). Every number is finite. Which breakdown of the totals the top level holds. redshift: every population is counted over the same redshifts on the same slice edges (one population, or several galaxy types in one window), and slices are redshift slices summing to the totals. observed: the populations' windows differ (e.g. lines seen at other redshifts through one filter); there are no top-level slices, and observed_bins breaks the totals down by observed flux or magnitude.
 */
export type Prediction = RedshiftBreakdown | ObservedBreakdown;
/**
 * Every population is counted over the same redshifts on the same slice edges: the top level is broken down by redshift slice.
 */
export type RedshiftBreakdown = PredictionBase & {
  breakdown: 'redshift';
  /**
   * Breakdown redshift only: the redshift slices, each holding the sum over populations (population_counts: each one's count); they sum to the totals.
   *
   * @minItems 1
   */
  slices: PredictionSlice[];
};
/**
 * The populations' windows differ: no top-level slices; observed_bins breaks the totals down by observed flux or magnitude.
 */
export type ObservedBreakdown = PredictionBase & {
  breakdown: 'observed';
  slices?: never;
};

/**
 * What every prediction holds, whatever its breakdown.
 */
export interface PredictionBase {
  format: 1;
  title: string;
  cosmology: CosmologyBlock;
  area_deg2: number;
  redshift: RedshiftRange;
  detection: LineFluxDetectionBlock | MagnitudeDetectionBlock | ThresholdDetectionBlock;
  /**
   * The variable of limit_at_center: log10 L [erg/s] (line_flux), log10 quantity (threshold, luminosity variable) or absolute AB magnitude (magnitude variable).
   */
  limit_variable: 'log10_luminosity' | 'log10_quantity' | 'absolute_magnitude';
  /**
   * The assumed model of every population: a forecast is only as good as the luminosity function assumed.
   *
   * @minItems 1
   */
  models: ModelDescription[];
  totals: PredictionTotals;
  /**
   * Each population's own result over its own window and slice edges (its window cut by explicit edges, when the file gives them). Each window is the population's whole redshift window (where the filter sees its line).
   *
   * @minItems 1
   */
  populations: PopulationPrediction[];
  /**
   * What the reader should know although nothing stopped the work (also printed on stderr, one line each); empty when there is nothing to say.
   */
  warnings: Warning[];
  observed_bins: ObservedBins;
  photo_z?: PhotoZMigration;
}
export interface LineFluxDetectionBlock {
  kind: 'line_flux';
  /**
   * faintest line flux counted, erg/s/cm^2
   */
  limit_cgs: number;
  /**
   * the limit as the file gave it, a velocity-integrated flux density in Jy km/s (only then); limit_cgs is limit_jy_km_s x nu_line / c, at the rest frequency of line_angstrom
   */
  limit_jy_km_s?: number;
  line_angstrom?: number;
  filter?: {
    center_angstrom: number;
    fwhm_angstrom: number;
    profile: 'tophat' | 'gaussian' | 'table';
    /**
     * the transmission file (profile table)
     */
    file?: string;
  };
  completeness?: CompletenessBlock;
}
export interface MagnitudeDetectionBlock {
  kind: 'magnitude';
  limit_ab_mag: number;
  /**
   * the limit as the file gave it, a flux density in Jy (only then); limit_ab_mag is its AB magnitude, -2.5 log10(limit_jy / 3631)
   */
  limit_jy?: number;
  /**
   * the unit the file wrote limit_jy in (only then); the table says the limit was given in it, as forecast, compare and plan quote their limits
   */
  limit_unit?: 'Jy' | 'mJy' | 'uJy' | 'nJy' | 'erg/s/cm^2/Hz' | 'W/m^2/Hz';
  /**
   * effective wavelength of the band
   */
  band_angstrom: number;
  /**
   * the band as the file gave it, a frequency in GHz (only then); band_angstrom is c / nu
   */
  band_ghz?: number;
  band_file?: string;
  /**
   * f_lambda ~ lambda^beta
   */
  beta: number;
  /**
   * the system the file gave the limit and completeness in; limit_ab_mag and the completeness are AB
   */
  system?: 'ab' | 'vega';
  /**
   * system vega: m_AB - m_Vega in the band
   */
  vega_to_ab?: number;
  /**
   * the rest-frame spectrum of detection.sed (beta then plays no part; a population's own sed replaces it for that population)
   */
  sed_file?: string;
  /**
   * with sed, or a population's own sed: the band of the synthetic photometry
   */
  band?: {
    profile: 'tophat' | 'gaussian' | 'table';
    center_angstrom: number;
    fwhm_angstrom: number;
  };
  igm: 'none' | 'madau1995';
  photo_z?: PhotoZDetection;
  completeness?: CompletenessBlock;
}
/**
 * detection.photo_z: a source at true z is measured at z + N(0, sigma (1 + z)), or with probability outlier_fraction anywhere in the redshift window with equal probability; slices are in measured redshift.
 */
export interface PhotoZDetection {
  sigma: number;
  outlier_fraction: number;
}
export interface ThresholdDetectionBlock {
  kind: 'threshold';
  /**
   * as written: log10 quantity or absolute magnitude, a table in z or an expression in z
   */
  limit: number | string | ZTable;
  photo_z?: PhotoZDetection;
  completeness?: CompletenessBlock;
}
export interface PredictionTotals {
  count: number;
  per_deg2: number;
  volume_mpc3: number;
  uncertainty?: UncertaintyBlock;
  /**
   * count-weighted mean redshift of the detected sources
   */
  mean_redshift?: number;
  luminosity_density?: LuminosityDensity;
  sfr_density_msun_yr_mpc3?: SfrDensity;
  model?: ModelSpread;
}
/**
 * Fractional 1-sigma uncertainty of a count: Poisson noise and cosmic variance.
 */
export interface UncertaintyBlock {
  /**
   * 1/sqrt(count)
   */
  poisson_fraction: number;
  /**
   * bias * sigma_matter / sqrt(field count)
   */
  cosmic_variance_fraction: number;
  /**
   * the two in quadrature
   */
  total_fraction: number;
  /**
   * the galaxy bias; for a total the count-weighted bias of the detected sources (each matched to the density where they lie, for bias auto)
   */
  bias: number;
  /**
   * rms linear matter fluctuation in one field's box; for a total the n(z)-weighted box's, times <b D>/b (so that the fraction is bias * sigma_matter / sqrt(fields))
   */
  sigma_matter: number;
  /**
   * present when the bias is matched to haloes (bias: auto); for a total of one population, the mass whose haloes above it have the total's bias at mean_redshift
   */
  halo_mass_min_msun?: number;
  /**
   * totals over one contiguous redshift range: the radial side of the n(z)-weighted box, (int q dchi)^2 / int q^2 dchi with q = dN/dchi * bias * growth
   */
  effective_depth_mpc?: number;
}
/**
 * Luminosity density, volume-averaged over the slice or window.
 */
export interface LuminosityDensity {
  /**
   * erg s^-1 Mpc^-3 (line luminosity), erg s^-1 Hz^-1 Mpc^-3 (magnitude variable, at the rest wavelength), or "<quantity> Mpc^-3"
   */
  unit: string;
  /**
   * of the detected sources (completeness-weighted)
   */
  detected: number;
  /**
   * of all sources, j = phi* L* Gamma(alpha+2) summed over components; absent when some alpha <= -2
   */
  total?: number;
  /**
   * detected / total
   */
  fraction?: number;
  /**
   * why total and fraction are absent
   */
  note?: string;
  model?: DensitySpread;
}
/**
 * A density under the luminosity function's own uncertainty: percentiles over the model's draws.
 */
export interface DensitySpread {
  draws: number;
  detected: Percentiles;
  total?: Percentiles;
}
/**
 * Percentiles over the model's draws.
 */
export interface Percentiles {
  /**
   * 2.5th percentile over the draws
   */
  p2_5: number;
  /**
   * 16th percentile
   */
  p16: number;
  /**
   * median
   */
  p50: number;
  /**
   * 84th percentile
   */
  p84: number;
  /**
   * 97.5th percentile
   */
  p97_5: number;
}
/**
 * Star-formation-rate density, Msun/yr/Mpc^3 (sfr_conversion times the luminosity density).
 */
export interface SfrDensity {
  detected: number;
  total?: number;
  model?: DensitySpread;
}
/**
 * The count under the luminosity function's own uncertainty (model_uncertainty): percentiles over the model's draws (linear between order statistics, Hyndman & Fan type 7), each draw a constant offset of the Schechter parameters at every redshift. Present when a population has model_uncertainty.
 */
export interface ModelSpread {
  /**
   * how many draws (--draws, or the rows of a draws file)
   */
  draws: number;
  /**
   * 2.5th percentile over the draws
   */
  p2_5: number;
  /**
   * 16th percentile
   */
  p16: number;
  /**
   * median
   */
  p50: number;
  /**
   * 84th percentile
   */
  p84: number;
  /**
   * 97.5th percentile
   */
  p97_5: number;
  /**
   * (p84 - p16) / (2 p50), 0 when p50 is 0: the model's fractional 1-sigma, beside poisson_fraction and cosmic_variance_fraction
   */
  fraction: number;
}
export interface PopulationPrediction {
  name: string;
  model: ModelDescription;
  window: RedshiftRange;
  totals: PredictionTotals;
  slices: PredictionSlice[];
  photo_z?: PhotoZMigration;
}
export interface PredictionSlice {
  z_min: number;
  z_max: number;
  /**
   * comoving volume of the slice over the survey area
   */
  volume_mpc3: number;
  count: number;
  per_deg2: number;
  cumulative_count: number;
  /**
   * the limit in the population's variable at the slice's middle redshift (see limit_variable; for a population whose window lies outside the file's explicit edges, at the window's nearer end); null where a narrow-band filter passes none of the population's lines there (between a line's window and a blended line's, or where a tabulated filter is 0), so that no source is detected at that redshift
   */
  limit_at_center: number | null;
  uncertainty?: UncertaintyBlock;
  /**
   * top-level slices of several populations: each population's count in the slice
   */
  population_counts?: {
    [k: string]: number;
  };
  /**
   * with detection.photo_z: the expected sources whose true redshift lies in the slice (count is by measured redshift)
   */
  count_true_redshift?: number;
  luminosity_density?: LuminosityDensity;
  sfr_density_msun_yr_mpc3?: SfrDensity;
  histogram: Histogram;
  model?: ModelSpread;
}
export interface Histogram {
  variable: 'apparent_magnitude' | 'log10_line_flux' | 'log10_quantity' | 'absolute_magnitude';
  /**
   * multiples of the bin width, ascending
   */
  edges: number[];
  /**
   * one fewer than edges; they sum to the slice's count (the brightest bin also holds the negligible tail beyond its edge)
   */
  counts: number[];
  model?: HistogramSpread;
}
/**
 * Each bin's count under the luminosity function's own uncertainty: the 16th and 84th percentiles over the first draws (at most 100), on the plain histogram's bins.
 */
export interface HistogramSpread {
  draws: number;
  p16: number[];
  p84: number[];
}
/**
 * Where the sources measured in each slice truly lie (detection.photo_z). Bins: [below the window, the slices..., above the window], in true redshift (true_bins, from the true range's ends) and in measured redshift (measured_bins, the first without z_min and the last without z_max; they hold the sources measured outside the window, which are lost).
 */
export interface PhotoZMigration {
  sigma: number;
  outlier_fraction: number;
  /**
   * how far beyond the window true redshifts are integrated, in sigma (1 + z): 6
   */
  reach_sigma: number;
  true_range: RedshiftRange;
  true_bins: PhotoZBin[];
  measured_bins: PhotoZBin[];
  /**
   * migration_matrix[i][j]: expected sources in true bin i measured in bin j; row sums are true_counts, column sums measured_counts, and both sum to the same total
   */
  migration_matrix: number[][];
  true_counts: number[];
  measured_counts: number[];
  /**
   * sources measured outside the window (the first and last measured bins), not counted in any slice
   */
  lost_count: number;
}
/**
 * A redshift bin; a missing end is unbounded (the measured bins below and above the window)
 */
export interface PhotoZBin {
  /**
   * absent: unbounded below
   */
  z_min?: number;
  /**
   * absent: unbounded above
   */
  z_max?: number;
}
/**
 * Per bin of the observed value (every population over its own window): each population's count and its share of the bin, the interloper fraction a spectroscopic follow-up faces. The bins' counts sum to totals.count.
 */
export interface ObservedBins {
  variable: 'apparent_magnitude' | 'log10_line_flux' | 'log10_quantity' | 'absolute_magnitude';
  /**
   * bin width in the variable (mag or dex); edges are multiples of it
   */
  width: number;
  bins: ObservedBin[];
}
export interface ObservedBin {
  min: number;
  max: number;
  count: number;
  per_deg2: number;
  populations: {
    [k: string]: {
      count: number;
      /**
       * count / the bin's count; 0 in an empty bin
       */
      share: number;
    };
  };
}
