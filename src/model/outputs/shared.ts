/* Generated from the definitions several schemas of specs/ hold by scripts/generate-output-types.ts: do not edit (run `npx tsx scripts/generate-output-types.ts`). */
/**
 * The completeness as the loader stored it: x in the completeness variable (observed AB magnitude; -log10 line flux; log10 quantity or absolute magnitude); it falls as x grows.
 */
export type CompletenessBlock =
  | {
      model: 'logistic';
      half: number;
      width: number;
    }
  | {
      model: 'table';
      x: number[];
      fraction: number[];
    };

/**
 * The assumed flat Lambda-CDM cosmology (the same block in every output). omega_b, sigma8 and n_s are absent only where the output depends on the expansion alone (distances from flags).
 */
export interface CosmologyBlock {
  /**
   * km/s/Mpc
   */
  h0: number;
  omega_m: number;
  omega_lambda: number;
  omega_r: number;
  /**
   * K; 0 means no radiation
   */
  t_cmb: number;
  omega_b?: number;
  sigma8?: number;
  n_s?: number;
  preset?: string;
  preset_source?: string;
}
/**
 * The assumed model of a population (src/population/describe.ts): each Schechter parameter as written and at the window's middle, and a one-line summary. A forecast is only as good as the luminosity function assumed.
 */
export interface ModelDescription {
  name: string;
  shape: 'schechter' | 'double_schechter';
  variable: 'luminosity' | 'magnitude';
  /**
   * what L* measures in a threshold survey, e.g. stellar mass [Msun]
   */
  quantity?: string;
  window: RedshiftRange;
  phi_star_mpc3: ParameterDescription;
  l_star?: ParameterDescription;
  m_star?: ParameterDescription;
  alpha: ParameterDescription;
  /**
   * double_schechter: both components (phi_star_mpc3 and alpha above are the first)
   */
  components?: {
    phi_star_mpc3: ParameterDescription;
    alpha: ParameterDescription;
  }[];
  model_uncertainty?: ModelUncertaintyBlock;
  sfr_conversion?: {
    name: 'halpha' | 'oii' | 'uv' | 'factor';
    /**
     * Msun/yr per erg/s (per erg/s/Hz for a magnitude variable)
     */
    factor: number;
    source: string;
  };
  line_angstrom?: number;
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
  /**
   * one line a person can read
   */
  summary: string;
  selection: SelectionBlock;
}
export interface RedshiftRange {
  min: number;
  max: number;
}
/**
 * One parameter of the assumed model: as written in the file and its value at the middle of the population's window.
 */
export interface ParameterDescription {
  /**
   * as written: a number, a table in z or an expression in z (normalisations in Mpc^-3 after the log10_ and _dex forms are converted)
   */
  given: number | string | ZTable;
  at_window_middle: number;
}
export interface ZTable {
  /**
   * [[z, value], ...], interpolated linearly
   */
  table: number[][];
}
/**
 * the population's model_uncertainty as read: 1-sigma offsets with their correlations (gaussian), or the draws file
 */
export interface ModelUncertaintyBlock {
  kind: 'gaussian' | 'draws';
  /**
   * the parameters varied, in the order of sigmas and of the file's columns
   */
  parameters: string[];
  /**
   * gaussian: 1 sigma per parameter (dex for log10 phi* and log10 L*, mag for M*)
   */
  sigmas?: {
    [k: string]: number;
  };
  /**
   * gaussian: the non-zero correlations by pair name a-b
   */
  correlations?: {
    [k: string]: number;
  };
  /**
   * draws: the draws file as named in the survey file
   */
  file?: string;
  /**
   * draws: the number of rows read
   */
  draws?: number;
}
/**
 * The selection effects applied to this population (docs/survey-file.md, "Selection effects"): which were used, whether attenuation was applied, and each one's value.
 */
export interface SelectionBlock {
  /**
   * the effects the file states for this population (empty: none; the prediction is then the plain one)
   */
  effects: ('redshift_selection' | 'blend_ratio' | 'blended_lines' | 'attenuation' | 'equivalent_width_cut')[];
  /**
   * true when the population's attenuation dims the observed flux (its luminosity function is then taken as intrinsic, dust-corrected); false when the file gives none
   */
  attenuation_applied: boolean;
  redshift_selection?: {
    /**
     * where the fraction was given (a population's own wins)
     */
    from: 'population' | 'detection';
    fraction: ParameterDescription;
  };
  /**
   * flux of the blended neighbouring lines relative to the line: the number given, or, given as a table or an expression in z, as written and at the middle of the population's window
   */
  blend_ratio?: number | ParameterDescription;
  /**
   * the lines blended with the population's line at their own wavelengths, each seen at its own filter transmission: the measured flux is L (T(line (1+z)) + sum ratio T(line_angstrom (1+z))) 10^(-0.4 A) / (4 pi D_L^2)
   */
  blended_lines?: {
    /**
     * rest wavelength of the blended line (Angstrom)
     */
    line_angstrom: number;
    /**
     * its flux relative to the population's line
     */
    ratio: number;
  }[];
  attenuation_mag?: ParameterDescription;
  equivalent_width_cut?: {
    frame: 'rest' | 'observed';
    width_angstrom: number;
    /**
     * the population's rest-frame equivalent-width distribution, in words
     */
    distribution: string;
    /**
     * fraction kept at the window's middle (taken as independent of luminosity)
     */
    kept_at_window_middle: number;
  };
  valid_redshift?: RedshiftRange;
}
