/**
 * From results to figures: every figure of a prediction (with the forecast and plan figures when
 * given), as the report and `--figures DIR` draw them. It imports the figure layer, and through it
 * (on first render) vega and vega-lite.
 *
 * A Prediction (src/model/outputs/prediction.ts) is drawn through a view (src/render/types.ts
 * PredictionView) that adds the assumed model as the user wrote it and the luminosity function of
 * each slice at its middle redshift (src/population/curves.ts).
 */
import type { Prediction, PredictionSlice } from '../model/outputs/prediction.js';
import type { Survey } from '../model/survey.js';
import { detectionLine } from './detection-text.js';
import type { Figure, ForecastView, ModelAsWritten, PlanView, PredictionView, SliceView } from './types.js';
import { curveAxisLabel, luminosityFunctionBand, luminosityFunctionCurve } from '../population/curves.js';
import { DEFAULT_MODEL_SEED, drawModelOffsets } from '../counts/model-draws.js';
import type { ModelOffsets } from '../model/model-uncertainty.js';
import { buildFigures, countsFigure, luminosityFunctionFigure, observedSharesFigure } from './figures.js';
import { checkSurvey } from '../model/arguments.js';

/** The population entries of the file as written (`population:` or `populations:`), in order. */
function rawPopulations(survey: Survey): Record<string, unknown>[] {
  const raw = survey.raw as { population?: unknown; populations?: unknown } | null | undefined;
  const list = Array.isArray(raw?.populations)
    ? raw.populations
    : raw?.population !== undefined
      ? [raw.population]
      : [];
  return list.map((p) => (p && typeof p === 'object' && !Array.isArray(p) ? (p as Record<string, unknown>) : {}));
}

/**
 * The assumed model of each population for people: name, shape and variable as used, every
 * parameter key as the user wrote it (so log10_l_star stays log10_l_star), and one line with the
 * values at the middle of the window.
 */
export function modelsForPeople(survey: Survey, prediction: Prediction): ModelAsWritten[] {
  const raws = rawPopulations(survey);
  return prediction.models.map((m, k) => {
    const raw = raws[k] ?? {};
    const out: ModelAsWritten = { name: m.name, shape: m.shape, variable: m.variable };
    if (m.quantity) out.quantity = m.quantity;
    for (const [key, value] of Object.entries(raw)) {
      if (key === 'name' || key === 'shape' || key === 'variable' || key === 'quantity') continue;
      out[key] = value;
    }
    out.values_used = m.summary.replace(/^[^:]*:\s*/, '');
    return out;
  });
}

/** One slice in the figure layer's shape, with the luminosity function of `population` drawn at its middle. */
function sliceView(s: PredictionSlice, curveOf?: (s: PredictionSlice) => SliceView['luminosity_function']): SliceView {
  const out: SliceView = {
    z_min: s.z_min,
    z_max: s.z_max,
    volume_mpc3: s.volume_mpc3,
    count: s.count,
    per_deg2: s.per_deg2,
    limit_at_center: s.limit_at_center,
    histogram: s.histogram,
  };
  if (s.uncertainty) out.uncertainty = s.uncertainty;
  if (s.model) out.model = s.model;
  if (curveOf) out.luminosity_function = curveOf(s);
  return out;
}

/**
 * The draws of population `k`'s model_uncertainty that predict counted (the same seeded offsets:
 * as many as its model blocks say, with the seed predict was given), or undefined without them.
 */
function modelDrawsOf(
  survey: Survey,
  k: number,
  draws: number | undefined,
  seed: number,
): readonly ModelOffsets[] | undefined {
  const p = survey.populations[k]!;
  const mu = p.modelUncertainty;
  if (!mu || !draws) return undefined;
  return drawModelOffsets(mu, p.components.length, draws, seed, k);
}

function curveFor(survey: Survey, k: number, offsets: readonly ModelOffsets[] | undefined) {
  const p = survey.populations[k]!;
  const label = curveAxisLabel(p, survey.detection.kind === 'threshold');
  return (s: PredictionSlice) => {
    const z = 0.5 * (s.z_min + s.z_max);
    const c = luminosityFunctionCurve(p, z, s.limit_at_center, { xLabel: label });
    if (offsets) c.band = luminosityFunctionBand(p, z, c.x, offsets);
    return c;
  };
}

/**
 * The prediction as the figures and the report read it. With one population the slices carry
 * its luminosity function; with several, `perPopulation` holds one such view per population
 * (its own slices, limits and curves) and the combined view carries none.
 */
export function predictionViews(
  survey: Survey,
  prediction: Prediction,
  modelSeed = DEFAULT_MODEL_SEED,
): { combined: PredictionView; perPopulation: PredictionView[] } {
  // each population's draws (their number from its own model blocks: a draws file has its rows)
  const drawsOf = (k: number) =>
    modelDrawsOf(
      survey,
      k,
      survey.populations.length === 1 ? prediction.totals.model?.draws : prediction.populations[k]?.totals.model?.draws,
      modelSeed,
    );
  const models = modelsForPeople(survey, prediction);
  const base = {
    format: prediction.format,
    title: prediction.title,
    cosmology: prediction.cosmology,
    area_deg2: prediction.area_deg2,
    redshift: prediction.redshift,
    ...(prediction.photo_z ? { measured_redshift: true } : {}),
  };
  const single = survey.populations.length === 1;
  const curve0 = single ? curveFor(survey, 0, drawsOf(0)) : undefined;
  const combined: PredictionView = {
    ...base,
    totals: prediction.totals,
    slices: (prediction.breakdown === 'redshift' ? prediction.slices : []).map((s) => sliceView(s, curve0)),
    model: single ? models[0]! : models,
    breakdown: prediction.breakdown,
    detection_text: `${detectionLine(prediction)}${prediction.detection.completeness ? ', with completeness' : ''}`,
  };
  if (!single) {
    combined.populations = prediction.populations.map((pp) => ({
      name: pp.name,
      window: pp.window,
      totals: pp.totals,
      slices: pp.slices.map((s) => sliceView(s)),
    }));
    combined.observed_bins = prediction.observed_bins;
  }
  const perPopulation = single
    ? [combined]
    : prediction.populations.map((pp, k) => {
        const curve = curveFor(survey, k, drawsOf(k));
        return { ...base, totals: pp.totals, slices: pp.slices.map((s) => sliceView(s, curve)), model: models[k]! };
      });
  return { combined, perPopulation };
}

/**
 * Every figure of a prediction, then the forecast and plan figures when given. One population:
 * counts, histograms and luminosity function. Several: the same for the top-level redshift slices
 * when every population is counted over the same redshifts, or one counts figure per population
 * when their windows differ (counts-1, counts-2, ...); one luminosity-function figure per
 * population; and the share of each population per bin of observed flux or magnitude (shares).
 */
export async function drawFigures(
  survey: Survey,
  prediction: Prediction,
  extra: { forecast?: ForecastView; plan?: PlanView; modelSeed?: number } = {},
): Promise<Figure[]> {
  checkSurvey(survey, 'drawFigures');
  const { modelSeed, ...sections } = extra;
  return drawViews(prediction, predictionViews(survey, prediction, modelSeed), sections);
}

/**
 * drawFigures from the prediction's views already made (predictionViews of the same survey,
 * prediction and seed): the report draws its figures and writes its tables from one set of views.
 */
export async function drawViews(
  prediction: Prediction,
  views: { combined: PredictionView; perPopulation: PredictionView[] },
  sections: { forecast?: ForecastView; plan?: PlanView } = {},
): Promise<Figure[]> {
  const { combined, perPopulation } = views;
  const main = await buildFigures({
    prediction: combined,
    model: perPopulation.length === 1 ? (combined.model as ModelAsWritten) : undefined,
    ...sections,
    surveyTitle: prediction.title,
  });
  if (perPopulation.length === 1) return main;
  const numbered = (f: Figure | null, k: number) => (f ? { ...f, name: `${f.name}-${k + 1}` } : null);
  // Windows that differ: each population's own counts per slice, its name in the title.
  const counts =
    prediction.breakdown === 'observed'
      ? await Promise.all(
          perPopulation.map(async (v, k) =>
            numbered(await countsFigure({ ...v, title: `${prediction.populations[k]!.name}: ${v.title}` }), k),
          ),
        )
      : [];
  const lf = await Promise.all(
    perPopulation.map(async (v, k) => numbered(await luminosityFunctionFigure(v, v.model as ModelAsWritten), k)),
  );
  const shares = await observedSharesFigure(prediction.observed_bins, prediction.title);
  // keep the fixed order: counts, histograms, luminosity function(s), shares, forecast, plan
  const at = main.findIndex((f) => f.name === 'forecast' || f.name === 'plan');
  const head = at < 0 ? main : main.slice(0, at);
  const tail = at < 0 ? [] : main.slice(at);
  return [...counts, ...head, ...lf, shares, ...tail].filter((f): f is Figure => f !== null);
}
