/**
 * What the figures and the HTML report read. Each is the producers' own output type
 * (src/model/outputs/, generated from specs/) narrowed to the fields drawn or tabulated, so that a
 * result of `predict`, `forecast` or `plan` is passed as it is; a piece that is absent is left out
 * of the figure or table, never drawn from made-up numbers.
 *
 * A prediction is drawn through a view (src/render/draw.ts `predictionViews`) that adds what the
 * output does not hold: the luminosity function of each slice at its middle redshift, and the
 * assumed model as the user wrote it.
 */
import type { LuminosityFunctionCurve } from '../population/curves.js';
import type { Forecast, FisherBlock, ForecastModelSpread, MocksBlock } from '../model/outputs/forecast.js';
import type { Plan, PlanDesign } from '../model/outputs/plan.js';
import type {
  ObservedBins,
  PopulationPrediction,
  Prediction,
  PredictionSlice,
  PredictionTotals,
} from '../model/outputs/prediction.js';
import type { CosmologyBlock, ModelDescription, RedshiftRange } from '../model/outputs/shared.js';

export type { LuminosityFunctionCurve };

/** One slice as drawn: the prediction's slice, with the luminosity function at its middle. */
export type SliceView = Pick<
  PredictionSlice,
  'z_min' | 'z_max' | 'volume_mpc3' | 'count' | 'per_deg2' | 'limit_at_center' | 'uncertainty' | 'model'
> &
  Partial<Pick<PredictionSlice, 'histogram'>> & {
    luminosity_function?: LuminosityFunctionCurve;
  };

/**
 * The assumed population as the user wrote it, for people: name, shape and variable as used, each
 * parameter key as written in the file (so log10_l_star stays log10_l_star) with its value as
 * written, and `values_used`: the values at the middle of the window (ModelDescription's summary).
 */
export interface ModelAsWritten {
  name?: string;
  shape?: string;
  /** "luminosity" | "magnitude". */
  variable?: string;
  quantity?: string;
  [key: string]: unknown;
}

/** A prediction as the figures and the report draw it. */
export interface PredictionView {
  title: string;
  cosmology?: CosmologyBlock;
  area_deg2: number;
  redshift?: RedshiftRange;
  totals: PredictionTotals;
  /** Redshift slices (none when the populations' windows differ: breakdown "observed"). */
  slices: SliceView[];
  model?: ModelAsWritten | ModelAsWritten[];
  breakdown?: Prediction['breakdown'];
  /** Several populations: each one's own result over its own window. */
  populations?: (Pick<PopulationPrediction, 'name' | 'window' | 'totals'> & { slices: SliceView[] })[];
  observed_bins?: ObservedBins;
  /** The detection in words, as the predict table's survey line gives it (src/render/detection-text.ts). */
  detection_text?: string;
  /** With detection.photo_z: the slices are in measured (photometric) redshift. */
  measured_redshift?: boolean;
}

/** The fields of a forecast (the `forecast` result) the figure and the report read. */
export type ForecastView = Pick<Forecast, 'parameters' | 'center'> & {
  fisher: Pick<FisherBlock, 'sigma' | 'correlation'>;
  /** What L* measures in a threshold survey (model.quantity). */
  model?: Pick<ModelDescription, 'quantity'> & Partial<Pick<ModelDescription, 'name'>>;
  /** The populations not forecast: the file holds several and the first is (forecast's JSON). */
  populations_left_out?: readonly string[];
  /** Mock fits (`fits`, columns in the order of `parameters`) and their summary per parameter. */
  mocks?: Partial<Pick<MocksBlock, 'count' | 'parameters' | 'fits'>>;
  /** The sigmas' p16-p84 across the draws of the population's model_uncertainty (forecast --model-draws). */
  model_spread?: Pick<ForecastModelSpread, 'draws' | 'seed' | 'source' | 'sigma' | 'notes'>;
};

/** One design of a plan as drawn and tabulated. */
export type PlanDesignView = Pick<
  PlanDesign,
  | 'exposure_hours_per_pointing'
  | 'pointings'
  | 'area_deg2'
  | 'limit'
  | 'count'
  | 'goal_value'
  | 'goal_value_pessimistic'
  | 'tiers'
> &
  Partial<Pick<PlanDesign, 'meets_minimum_count'>>;

/** The fields of a plan (the `plan` result) the figure and the report read. */
export type PlanView = Pick<Plan, 'goal' | 'budget_hours' | 'limit_unit'> &
  Partial<Pick<Plan, 'limit_variable' | 'goal_direction'>> & {
    designs: readonly PlanDesignView[];
    best?: PlanDesignView;
    /** The designs at either end of the near-best range; with `tolerance`, which designs between are within it. */
    near_best?: { from: PlanDesignView; to: PlanDesignView; tolerance?: number; contiguous?: boolean };
    /** With robust: true, how the designs were ranked across the model (best is the robust best). */
    robust?: Pick<NonNullable<Plan['robust']>, 'draws' | 'source' | 'percentile' | 'same_design'> & {
      best_assumed: PlanDesignView;
      /** How often the robust best wins draw by draw (a plan's robust.agreement). */
      agreement?: NonNullable<Plan['robust']>['agreement'];
    };
  };

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
