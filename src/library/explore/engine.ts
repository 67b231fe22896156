/**
 * The explore page's engine: the survey file's text in (as the page's settings wrote it), the
 * numbers the page shows out. It runs the loader, `predict` and the forecast's Fisher matrix
 * exactly as `skytally predict` and `skytally forecast` do on that text, so that every
 * `data-output` of the page equals the commands' JSON on the written-back file (docs/outputs.md,
 * "explore"). The same module runs in Node (the page's first state, the tests and benchmarks) and
 * in the page (bundled by scripts/explore-bundle.mjs).
 */
import { checkSource, checkText } from '../../model/arguments.js';
import type { Survey } from '../../model/survey.js';
import type { Prediction, PredictionSlice, UncertaintyBlock } from '../../model/outputs/prediction.js';
import { loadSurveyText, parseSurveyObject } from '../../survey/load.js';
import { predict } from '../../counts/predict.js';
import { forecast } from '../../forecast/forecast.js';
import { FisherSumsMemo } from '../../forecast/grid-memo.js';
import { CountMemo } from '../../counts/count-memo.js';
import { luminosityFunctionCurve } from '../../population/curves.js';
import { biasWords } from '../../population/describe.js';
import type {
  CountsFigureData,
  ExploreOutput,
  ExploreResult,
  ExploreSliceRow,
  LfFigureData,
} from '../../model/explore.js';
import { predictionHeader } from '../../render/prediction-header.js';

export type { CountsFigureData, ExploreOutput, ExploreResult, ExploreSliceRow, LfFigureData };

/** The model uncertainty block a slice or total carries when the population has model_uncertainty. */
function modelFraction(o: object): number | undefined {
  const m = (o as { model?: { fraction?: unknown } }).model;
  return m && typeof m.fraction === 'number' ? m.fraction : undefined;
}

function row(s: PredictionSlice, population: string | undefined, pending: boolean): ExploreSliceRow {
  const u: UncertaintyBlock | undefined = s.uncertainty;
  const r: ExploreSliceRow = { zMin: s.z_min, zMax: s.z_max, count: s.count };
  if (population !== undefined) r.population = population;
  if (u) {
    r.poisson = u.poisson_fraction;
    r.cosmicVariance = u.cosmic_variance_fraction;
    r.total = u.total_fraction;
  }
  const m = modelFraction(s);
  if (m !== undefined) r.model = m;
  else if (pending) r.modelPending = true;
  return r;
}

function lfData(survey: Survey, prediction: Prediction, k: number): LfFigureData {
  const p = survey.populations[k]!;
  const pp = prediction.populations[k]!;
  const curves = pp.slices.map((s) => {
    const z = 0.5 * (s.z_min + s.z_max);
    const c = luminosityFunctionCurve(p, z, s.limit_at_center);
    return { z, x: c.x, phi: c.phi, limit: c.limit };
  });
  const first = luminosityFunctionCurve(
    p,
    0.5 * (pp.slices[0]!.z_min + pp.slices[0]!.z_max),
    pp.slices[0]!.limit_at_center,
  );
  return {
    title: survey.populations.length > 1 ? pp.name : 'Luminosity function',
    xLabel: first.x_label,
    magnitude: p.variable === 'magnitude',
    curves,
  };
}

/**
 * What the page keeps from one update to the next: work that a change of a control cannot alter
 * (each population's counts and the Fisher sums of the density grid, at any area:
 * src/counts/count-memo.ts, src/forecast/grid-memo.ts). The numbers are those computed without it.
 */
export interface ExploreMemo {
  counts: CountMemo;
  fisherSums: FisherSumsMemo;
}

export function exploreMemo(): ExploreMemo {
  return { counts: new CountMemo(), fisherSums: new FisherSumsMemo() };
}

/**
 * Every number of the page for one survey: its text (`source.text`, read as the loader reads a
 * file) or its parsed form (`source.object`, as settingsObject makes it: the page's updates skip
 * writing and reading YAML). `text` is kept in the result as the text the numbers are of; `keep`,
 * the page's memory of earlier updates.
 */
export async function exploreCompute(
  source: { text: string; object?: unknown },
  file: string,
  baseDir: string,
  keep?: ExploreMemo,
): Promise<ExploreResult> {
  checkSource(source, 'exploreCompute');
  checkText(
    file,
    'exploreCompute',
    'the name of the file as its second argument (for messages)',
    'source, "my-survey.yaml", "."',
  );
  checkText(
    baseDir,
    'exploreCompute',
    'the folder its input files are read from as its third argument',
    'source, "my-survey.yaml", "."',
  );
  const step = await exploreFirst(source, file, baseDir, keep, false);
  return step.model ? step.model() : step.result;
}

/**
 * The page's update in two steps: `result`, every number but those of the model's draws (each
 * output and slice-table cell of the model marked pending), and `model` (absent when the survey
 * has no model_uncertainty), which draws the model and returns the whole result, the numbers
 * exploreCompute gives. The page shows the first and draws the model after it (the draws of a
 * model cost as much as the rest of an update: src/explore/browser/main.ts). With `keep`, both
 * steps read one count of each population (src/counts/count-memo.ts).
 */
export async function exploreInTwo(
  source: { text: string; object?: unknown },
  file: string,
  baseDir: string,
  keep?: ExploreMemo,
): Promise<{ result: ExploreResult; model?: () => ExploreResult }> {
  return exploreFirst(source, file, baseDir, keep, true);
}

async function exploreFirst(
  source: { text: string; object?: unknown },
  file: string,
  baseDir: string,
  keep: ExploreMemo | undefined,
  modelLater: boolean,
): Promise<{ result: ExploreResult; model?: () => ExploreResult }> {
  const text = source.text;
  let survey: Survey;
  try {
    survey =
      source.object !== undefined
        ? parseSurveyObject(source.object, file, baseDir)
        : loadSurveyText(text, file, baseDir);
  } catch (e) {
    return {
      result: {
        text,
        error: e instanceof Error ? e.message : String(e),
        title: '',
        outputs: [],
        rows: [],
        counts: [],
        lf: [],
        warnings: [],
      },
    };
  }
  const withModel = survey.populations.some((p) => p.modelUncertainty !== undefined);
  // The model draws of counts only: the page shows no histogram bins or densities under the draws.
  const predictWith = (draws: boolean): Prediction =>
    predict(survey, {
      model: draws ? { counts: true } : { counts: true, draws: 0 },
      ...(keep ? { countMemo: keep.counts } : {}),
    });
  const later = modelLater && withModel;
  const result = resultOf(survey, predictWith(!later), text, later);
  await addFisher(survey, result, keep);
  if (!later) return { result };
  const fisher = { fisher: result.fisher, fisherNote: result.fisherNote };
  return {
    result,
    model: () => {
      // the same survey and counts (from the page's count memory when it keeps one), now with the model's draws
      const full = resultOf(survey, predictWith(true), text, false);
      if (fisher.fisher) full.fisher = fisher.fisher;
      if (fisher.fisherNote !== undefined) full.fisherNote = fisher.fisherNote;
      full.outputs.push(...result.outputs.filter((o) => o.name.startsWith('sigma-')));
      return full;
    },
  };
}

/** The page's numbers of one prediction; `pending`: the model's draws are still to come (their outputs marked so). */
function resultOf(survey: Survey, prediction: Prediction, text: string, pending: boolean): ExploreResult {
  const t = prediction.totals;
  const outputs: ExploreOutput[] = [
    { name: 'total-count', label: 'Expected count', value: t.count, kind: 'count' },
    { name: 'total-per-deg2', label: 'Per deg^2', value: t.per_deg2, kind: 'plain' },
  ];
  if (t.uncertainty) {
    outputs.push({
      name: 'total-poisson',
      label: 'Poisson (fraction)',
      value: t.uncertainty.poisson_fraction,
      kind: 'fraction',
    });
    outputs.push({
      name: 'total-cosmic-variance',
      label: 'Cosmic variance (fraction)',
      value: t.uncertainty.cosmic_variance_fraction,
      kind: 'fraction',
    });
    outputs.push({
      name: 'total-uncertainty',
      label: 'Both in quadrature (fraction)',
      value: t.uncertainty.total_fraction,
      kind: 'fraction',
    });
  }
  const m = modelFraction(t);
  if (m !== undefined)
    outputs.push({ name: 'total-model', label: 'Model uncertainty (fraction)', value: m, kind: 'fraction' });
  else if (pending)
    outputs.push({
      name: 'total-model',
      label: 'Model uncertainty (fraction)',
      value: NaN,
      kind: 'fraction',
      pending: true,
    });
  const rows =
    prediction.breakdown === 'redshift'
      ? prediction.slices.map((s) => row(s, undefined, pending))
      : prediction.populations.flatMap((pp, k) =>
          pp.slices.map((s) => row(s, pp.name, pending && survey.populations[k]!.modelUncertainty !== undefined)),
        );
  const counts: CountsFigureData[] = (
    prediction.breakdown === 'redshift'
      ? [{ title: 'Counts per slice', slices: prediction.slices }]
      : prediction.populations.map((pp) => ({ title: pp.name, slices: pp.slices }))
  ).map((f) => ({
    title: f.title,
    slices: f.slices.map((s) => ({
      zMin: s.z_min,
      zMax: s.z_max,
      count: s.count,
      fraction: s.uncertainty?.total_fraction ?? 0,
    })),
  }));
  const lf = survey.populations.map((_, k) => lfData(survey, prediction, k));
  const result: ExploreResult = {
    text,
    title: prediction.title,
    outputs,
    rows,
    counts,
    lf,
    warnings: prediction.warnings.map((w) => w.message),
    assumed: predictionHeader(prediction).slice(1),
  };
  const u = t.uncertainty;
  const c = prediction.cosmology;
  if (u && typeof u.bias === 'number' && typeof u.sigma_matter === 'number' && c.sigma8 !== undefined)
    result.clustering = {
      sigma8: c.sigma8,
      ...(c.n_s !== undefined ? { nS: c.n_s } : {}),
      bias: u.bias,
      ...givenBias(survey),
      sigmaMatter: u.sigma_matter,
      ...(u.halo_mass_min_msun !== undefined ? { haloMassMin: u.halo_mass_min_msun } : {}),
      ...(u.effective_depth_mpc !== undefined ? { effectiveDepth: u.effective_depth_mpc } : {}),
    };
  return result;
}

/**
 * The bias the file gives, in words, for the cosmic-variance note: "0.84 / D(z)" (one population),
 * "ELGs 0.84 / D(z), LRGs matched to haloes" (several); none when every population has bias auto.
 */
function givenBias(survey: Survey): { biasGiven?: string } {
  const pops = survey.populations;
  if (pops.every((p) => p.bias === 'auto')) return {};
  const words = (b: Survey['populations'][number]['bias']): string =>
    b === 'auto' ? 'matched to haloes' : biasWords(b.source);
  if (pops.length === 1) return { biasGiven: words(pops[0]!.bias) };
  return { biasGiven: pops.map((p) => `${p.name} ${words(p.bias)}`).join(', ') };
}

/** The forecast's Fisher sigmas of the first population (or why there are none), added to `result`. */
async function addFisher(survey: Survey, result: ExploreResult, keep: ExploreMemo | undefined): Promise<void> {
  const first = survey.populations[0]!;
  if (first.shape === 'double_schechter') {
    result.fisherNote =
      'The Fisher matrix varies one Schechter function: not available for a double Schechter population.';
    return;
  }
  try {
    const f = await forecast(survey, keep ? { fisherSums: keep.fisherSums } : {});
    const names = f.parameters;
    result.fisher = {
      population: first.name,
      names,
      sigma: names.map((n) => f.fisher.sigma[n]!),
      sigmaPoisson: names.map((n) => f.fisher_poisson_only.sigma[n]!),
    };
    names.forEach((n, i) =>
      result.outputs.push({
        name: `sigma-${n}`,
        label: `sigma(${n})`,
        value: result.fisher!.sigma[i]!,
        kind: 'plain',
      }),
    );
  } catch (e) {
    result.fisherNote = e instanceof Error ? e.message : String(e);
  }
}
