import type { DepthLaw, LimitKind } from './plan.js';

/** What the explore page shows for one survey text (src/library/explore/engine.ts makes it, src/render/explore/ draws it). */

/** One live number of the page: `data-output` = name, `data-value` = value at full precision. */
export interface ExploreOutput {
  name: string;
  label: string;
  value: number;
  /** fraction: shown as a percentage; count: an expected number; plain: as it is. */
  kind: 'count' | 'fraction' | 'plain';
  /** The number is still to come (the model's draws, drawn after the rest: value NaN, not shown). */
  pending?: true;
}

/** One row of the slice table (output names `slice-<row>-count`, ...; rows counted from 1). */
export interface ExploreSliceRow {
  population?: string;
  zMin: number;
  zMax: number;
  count: number;
  poisson?: number;
  cosmicVariance?: number;
  total?: number;
  /** The model uncertainty's fraction, when the population states one. */
  model?: number;
  /** The model's fraction is still to come (drawn after the rest of the page's numbers). */
  modelPending?: true;
}

export interface CountsFigureData {
  title: string;
  slices: { zMin: number; zMax: number; count: number; fraction: number }[];
}

export interface LfFigureData {
  title: string;
  xLabel: string;
  magnitude: boolean;
  curves: { z: number; x: number[]; phi: number[]; limit: number | null }[];
}

export interface ExploreResult {
  /** The survey file's text the numbers are of. */
  text: string;
  /** Why the settings are not a survey the loader accepts (then nothing else is filled). */
  error?: string;
  title: string;
  outputs: ExploreOutput[];
  rows: ExploreSliceRow[];
  counts: CountsFigureData[];
  lf: LfFigureData[];
  /** The Fisher sigmas of the first population (with cosmic variance, as `forecast` prints them). */
  fisher?: { population: string; names: string[]; sigma: number[]; sigmaPoisson: number[] };
  /** Why there is no Fisher matrix (a double Schechter population, no sources, a singular matrix). */
  fisherNote?: string;
  warnings: string[];
  /**
   * What the numbers assume, as predict's table states it: the survey (area, window, detection,
   * filter, completeness), the cosmology and each population's model (`Survey: ...`,
   * `Cosmology: ...`, `Assumed model: ...`).
   */
  assumed?: string[];
  /**
   * What the cosmic variance assumed (with it): the power spectrum's sigma8 and n_s, the total's
   * count-weighted bias and the halo mass abundance matching gave it, the matter's sigma in the box
   * and the box's effective depth, as `predict` gives them; and the bias each population gives, in
   * words ("0.84 / D(z)"; absent when every population has bias auto).
   */
  clustering?: {
    sigma8: number;
    nS?: number;
    bias: number;
    biasGiven?: string;
    sigmaMatter: number;
    haloMassMin?: number;
    effectiveDepth?: number;
  };
}

/** One control of the page. */
export interface ControlSpec {
  /** The survey-file key path, as messages write it: `area`, `detection.limit`, `populations[1].alpha`. */
  key: string;
  /** The same path as YAML keys and list indices. */
  path: (string | number)[];
  /** What the control is, for people. */
  label: string;
  /** The unit of `value` (the key's unit in docs/survey-file.md), '' for a plain number. */
  unit: string;
  /** The value the file gives (converted to `unit`). */
  value: number;
  min: number;
  max: number;
  /** Step of the number field (and of the arrow keys). */
  step: number;
  /** log: the slider moves in log10 of the value. */
  scale: 'linear' | 'log';
  /** Where the range comes from: the population's model_uncertainty, or the page's default span. */
  range: 'model_uncertainty' | 'default';
  /**
   * A plan file's exposure per pointing (key `plan.exposure_per_pointing`, not a key of the file):
   * it sets `area` (the whole pointings the budget buys) and `detection.limit` (the depth law).
   */
  plan?: ExposureControl;
}

/** What the exposure-per-pointing control needs to turn hours into an area and a limit. */
export interface ExposureControl {
  fieldOfViewDeg2: number;
  overheadHours: number;
  budgetHours: number;
  maxPointings: number;
  limitKind: LimitKind;
  law: DepthLaw;
  /**
   * m_AB - m_Vega when the file gives its magnitude limit in Vega (`detection.system: vega`): the
   * depth law's limit is AB, and the limit written back is that minus this.
   */
  writtenVegaToAb?: number;
  /**
   * The file's completeness curve, which a plan design moves with its limit (docs/survey-file.md,
   * "Completeness"): the file's limit and each number of the curve as written (a logistic `half`,
   * or each table row's x), in the units a plain number of that key is read in. Absent without a
   * curve.
   */
  completeness?: MovedCompleteness;
}

/** What the exposure control moves of the completeness curve (ExposureControl.completeness). */
export interface MovedCompleteness {
  /** magnitude: the curve moves by the limit's difference; line_flux: by the limits' ratio. */
  kind: 'magnitude' | 'line_flux';
  /** The file's limit: a magnitude in the file's system, or erg/s/cm^2. */
  fileLimit: number;
  /** Each number of the curve: its key path and its value as written, as a plain number. */
  entries: { path: (string | number)[]; value: number }[];
}
