/**
 * What the figure and report layer reads. These mirror the JSON documents of
 * /work/shared/design/outputs.md (snake_case keys, units in the names) and hold only the fields
 * drawn or tabulated here. Everything added after format 1 is optional: a figure or table whose
 * piece is absent is left out, never drawn from made-up numbers.
 */

/** Fractional 1-sigma uncertainty of a count (per slice or for the total). */
export interface UncertaintyJson {
  /** sqrt(N) / N. */
  poisson_fraction?: number;
  /** Cosmic variance as a fraction of the count. */
  cosmic_variance_fraction?: number;
  /** Both added in quadrature; the error bars use this. */
  total_fraction: number;
  /** Linear bias assumed for the population. */
  bias?: number;
  /** rms matter fluctuation in the slice's volume. */
  sigma_matter?: number;
}

export type HistogramVariable = 'apparent_magnitude' | 'log10_line_flux' | 'log10_quantity';

export interface HistogramJson {
  variable: HistogramVariable | string;
  /** Bin edges, ascending; one more than `counts`. */
  edges: number[];
  counts: number[];
}

/** The assumed luminosity function at a slice's middle redshift, ready to plot. */
export interface LuminosityFunctionCurve {
  /** Population variable: log10 L [erg/s] (or log10 quantity) or absolute AB magnitude M. */
  x: number[];
  /** Number density per unit of x [Mpc^-3 per dex, or per mag]. */
  phi: number[];
  /** The limit at the slice's middle redshift, in x. */
  limit?: number;
  /** log10 L* or M* at that redshift. */
  knee?: number;
  /** Axis label with units, e.g. "log10 L [erg/s]". */
  x_label?: string;
}

export interface SliceJson {
  z_min: number;
  z_max: number;
  volume_mpc3: number;
  count: number;
  per_deg2: number;
  /** log10 L for luminosity, M for magnitude (outputs.md). */
  limit_at_center: number;
  histogram?: HistogramJson;
  uncertainty?: UncertaintyJson;
  luminosity_function?: LuminosityFunctionCurve;
}

/** A model parameter as written: a number, a table in z, or an expression string in z. */
export type ModelValue = number | string | { table: [number, number][] } | null | undefined | unknown;

/** The assumed population, described for people ({name, shape, variable, phi_star, ...}). */
export interface ModelDescription {
  name?: string;
  shape?: string;
  /** "luminosity" | "magnitude". */
  variable?: string;
  quantity?: string;
  [key: string]: ModelValue;
}

export interface CosmologyJson {
  h0: number;
  omega_m: number;
  omega_lambda?: number;
  omega_r?: number;
  t_cmb?: number;
}

export interface PredictionJson {
  format?: number;
  title: string;
  cosmology?: CosmologyJson;
  area_deg2: number;
  redshift?: { min: number; max: number };
  totals: { count: number; per_deg2: number; volume_mpc3: number; uncertainty?: UncertaintyJson };
  /** Redshift slices (empty when the populations' windows differ: breakdown "observed"). */
  slices: SliceJson[];
  model?: ModelDescription | ModelDescription[];
  /** Which breakdown of the totals the slices hold: "redshift", or "observed" (see observed_bins). */
  breakdown?: 'redshift' | 'observed';
  /** Several populations: each one's own result over its own window. */
  populations?: { name: string; window: { min: number; max: number }; totals: PredictionJson['totals']; slices: SliceJson[] }[];
  /** Per bin of the observed value, every population's count and share. */
  observed_bins?: ObservedBinsJson;
}

export interface ForecastJson {
  /** Parameter names, e.g. ["log10_phi_star", "log10_l_star", "alpha"]. */
  parameters: string[];
  fisher: {
    /** Marginal 1-sigma error of each parameter. */
    sigma: Record<string, number>;
    /** Correlation matrix in the order of `parameters`. */
    correlation: number[][];
  };
  /** The fiducial values. */
  center: Record<string, number>;
  /** What L* measures when it is not a luminosity (threshold surveys), e.g. "stellar mass [Msun]". */
  quantity?: string;
  mocks?: {
    /**
     * One row per mock catalogue, columns in the order of `parameters` (or `mocks.parameters`);
     * null where the estimator does not constrain a parameter.
     */
    fits?: (number | null)[][];
    parameters?: string[];
    [key: string]: unknown;
  };
  [key: string]: unknown;
}

export interface PlanDesign {
  exposure_hours_per_pointing: number;
  pointings: number;
  area_deg2: number;
  limit: number;
  count: number;
  goal_value: number;
}

export interface PlanJson {
  /** What is optimised, e.g. "count" or "sigma_alpha". */
  goal: string;
  budget_hours: number;
  designs: PlanDesign[];
  best?: PlanDesign;
  /** Exposure per pointing [hours] over which the goal stays near its best. */
  near_best?: { from: number; to: number };
}

/** One drawn figure. */
export interface Figure {
  /** File-safe name: the SVG is written as <name>.svg. */
  name: string;
  /** Title shown above it (contains the survey title). */
  title: string;
  /** The vega-lite specification (data values inline). */
  spec: Record<string, unknown>;
  /** The rendered SVG document. */
  svg: string;
}

/** Per bin of the observed value, every population's count and share (predict's observed_bins). */
export interface ObservedBinsJson {
  /** apparent_magnitude | log10_line_flux | log10_quantity | absolute_magnitude. */
  variable: string;
  width: number;
  bins: { min: number; max: number; count: number; populations: Record<string, { count: number; share: number }> }[];
}
