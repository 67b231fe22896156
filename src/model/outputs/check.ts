/* Generated from specs/check.schema.json by scripts/generate-output-types.ts: do not edit (run `npx tsx scripts/generate-output-types.ts`). */
import type { Warning } from '../../warnings.js';
import type {
  CompletenessBlock,
  CosmologyBlock,
  ModelUncertaintyBlock,
  RedshiftRange,
  SelectionBlock,
  ZTable,
} from './shared.js';

/**
 * A parameter: its normalised value when constant; otherwise what the file wrote and the normalised values at the window's ends.
 */
export type ParameterView =
  | number
  | {
      as_written:
        | number
        | string
        | ZTable
        | {
            over_growth: number;
          };
      at_window_min: number;
      at_window_max: number;
    };

/**
 * A survey file as the loader normalised it (skytally check FILE --format json): plain numbers in stated units (the unit in each key's name), parameters that vary with z shown as written with their values at the ends of the population's window.
 */
export interface SurveyCheck {
  format: 1;
  file: string;
  title: string;
  cosmology: CosmologyBlock;
  area_deg2: number;
  area_sr: number;
  window: RedshiftRange;
  field: {
    aspect: number;
    count: number;
  };
  exposure_hours?: number;
  detection:
    | {
        kind: 'line_flux';
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
    | {
        kind: 'magnitude';
        limit_mag: number;
        /**
         * the limit as the file gave it, a flux density in Jy (only then); limit_mag is its AB magnitude, -2.5 log10(limit_jy / 3631)
         */
        limit_jy?: number;
        band_angstrom: number;
        /**
         * the band as the file gave it, a frequency in GHz (only then); band_angstrom is c / nu
         */
        band_ghz?: number;
        band_file?: string;
        beta: number;
        /**
         * the system the file gave the limit and completeness in; limit_mag and the completeness are AB
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
        /**
         * detection.photo_z: slices are in measured redshift; true redshifts are integrated 6 sigma (1 + z) beyond the window (true_range)
         */
        photo_z?: {
          sigma: number;
          outlier_fraction: number;
          true_range: RedshiftRange;
        };
        completeness?: CompletenessBlock;
      }
    | {
        kind: 'threshold';
        limit: ParameterView;
        /**
         * detection.photo_z: slices are in measured redshift; true redshifts are integrated 6 sigma (1 + z) beyond the window (true_range)
         */
        photo_z?: {
          sigma: number;
          outlier_fraction: number;
          true_range: RedshiftRange;
        };
        completeness?: CompletenessBlock;
      };
  /**
   * @minItems 1
   */
  populations: PopulationView[];
  slices: {
    count: number;
    edges: number[];
  };
  histogram_width: number;
  /**
   * What the reader should know although nothing stopped the work (also printed on stderr, one line each); empty when there is nothing to say.
   */
  warnings: Warning[];
}
export interface PopulationView {
  name: string;
  shape: 'schechter' | 'double_schechter';
  variable: 'luminosity' | 'magnitude';
  quantity?: string;
  window: RedshiftRange;
  phi_star_mpc3: ParameterView;
  l_star?: ParameterView;
  m_star?: ParameterView;
  alpha: ParameterView;
  components?: {
    phi_star_mpc3: ParameterView;
    alpha: ParameterView;
  }[];
  sfr_conversion?: {
    name: 'halpha' | 'oii' | 'uv' | 'factor';
    factor: number;
  };
  slice_edges: number[];
  line_angstrom?: number;
  /**
   * variable: magnitude only: the rest wavelength in Angstrom where the absolute magnitudes are defined (a luminosity population, such as a line's, has none)
   */
  rest_wavelength_angstrom?: number;
  /**
   * magnitude kind: absolute magnitudes are AB in this rest-frame band (rest_wavelength_angstrom is then its center)
   */
  rest_band?: {
    profile: 'tophat' | 'gaussian' | 'table';
    center_angstrom: number;
    fwhm_angstrom: number;
    /**
     * the band file (profile table)
     */
    file?: string;
  };
  /**
   * magnitude variable: every magnitude is stated in AB; m_star as the file gave it (ab, or vega converted once: AB = Vega + vega_to_ab)
   */
  magnitude_system?: {
    stated: 'ab';
    m_star_given: 'ab' | 'vega';
    vega_to_ab?: number;
  };
  /**
   * magnitude kind: how apparent magnitudes follow from absolute ones: the power-law colour term (beta), or synthetic photometry of a rest-frame spectrum through the band (Hogg et al. 2002)
   */
  k_correction?: {
    method: 'power_law' | 'spectrum';
    /**
     * f_lambda ~ lambda^beta: the population's own beta when it gives one (beta_from), else detection.beta
     */
    beta?: number;
    /**
     * present when the population gives its own beta, which replaces detection.beta for it
     */
    beta_from?: 'population';
    /**
     * the spectrum used: the population's own sed when it gives one (spectrum_from), else detection.sed
     */
    spectrum_file?: string;
    /**
     * present when the population gives its own sed, which replaces detection.sed or the power law for it
     */
    spectrum_from?: 'population';
  };
  bias: 'auto' | ParameterView;
  occupation: number;
  selection: SelectionBlock;
  model_uncertainty?: ModelUncertaintyBlock;
}
