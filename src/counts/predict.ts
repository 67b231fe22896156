/**
 * predict: a Survey in, a Prediction (the JSON of outputs.md, "predict") out.
 * Every population is counted on the survey's slice edges; the top-level slices and totals are
 * the sum over populations.
 */
import { FlatLambdaCDM } from '../cosmology/flat-lcdm.js';
import type { Population, Survey } from '../survey/types.js';
import { countPopulation, type Histogram, type SliceCount } from './engine.js';
import { cosmologyJsonOf, type CosmologyJsonShape } from '../cosmology/json.js';
import { combinedUncertainty, countWeightedRedshift, uncertaintyContext, type UncertaintyContext, type UncertaintyJson } from '../uncertainty/prediction.js';
import { describeModel, type ModelDescription } from '../population/describe.js';

export interface PredictionSlice {
  z_min: number;
  z_max: number;
  volume_mpc3: number;
  count: number;
  per_deg2: number;
  cumulative_count: number;
  limit_at_center: number;
  histogram: Histogram;
  /** Absent only for a slice with no expected source. */
  uncertainty?: UncertaintyJson;
}

export interface PredictionTotals {
  count: number;
  per_deg2: number;
  volume_mpc3: number;
  uncertainty?: UncertaintyJson;
  /** Count-weighted mean redshift, where the total's cosmic variance is evaluated. */
  mean_redshift?: number;
}

export interface PopulationPrediction {
  name: string;
  model: ModelDescription;
  totals: PredictionTotals;
  slices: PredictionSlice[];
}

export type CosmologyJson = CosmologyJsonShape;

export interface Prediction {
  format: 1;
  title: string;
  cosmology: CosmologyJson;
  area_deg2: number;
  redshift: { min: number; max: number };
  detection: Record<string, unknown>;
  /** The assumed model of every population, as written and as evaluated at the window's middle. */
  models: ModelDescription[];
  /** Which variable the limits are in: "log10_luminosity" | "log10_quantity" | "absolute_magnitude". */
  limit_variable: string;
  totals: PredictionTotals;
  slices: PredictionSlice[];
  populations: PopulationPrediction[];
}

export function cosmologyJson(survey: Survey): CosmologyJson {
  return cosmologyJsonOf(survey.cosmology);
}

export function detectionJson(survey: Survey): Record<string, unknown> {
  const d = survey.detection;
  const base: Record<string, unknown> = { kind: d.kind };
  if (d.kind === 'line_flux') {
    base.limit_cgs = d.limitCgs;
    if (d.lineAngstrom !== undefined) base.line_angstrom = d.lineAngstrom;
    if (d.filter) base.filter = { center_angstrom: d.filter.centerAngstrom, fwhm_angstrom: d.filter.fwhmAngstrom, profile: d.filter.profile };
  } else if (d.kind === 'magnitude') {
    base.limit_ab_mag = d.limitMag;
    base.band_angstrom = d.bandAngstrom;
    base.beta = d.beta;
  } else {
    base.limit = d.limit.source;
  }
  if (d.completeness) base.completeness = d.completeness;
  return base;
}

function limitVariable(survey: Survey, p: Population): string {
  if (p.variable === 'magnitude') return 'absolute_magnitude';
  return survey.detection.kind === 'threshold' ? 'log10_quantity' : 'log10_luminosity';
}

function toSlices(counts: SliceCount[], areaDeg2: number): PredictionSlice[] {
  let cumulative = 0;
  return counts.map((s) => {
    cumulative += s.count;
    return {
      z_min: s.zMin,
      z_max: s.zMax,
      volume_mpc3: s.volumeMpc3,
      count: s.count,
      per_deg2: s.count / areaDeg2,
      cumulative_count: cumulative,
      limit_at_center: s.limitAtCenter,
      histogram: s.histogram,
    };
  });
}

function totalsOf(slices: PredictionSlice[], areaDeg2: number): PredictionTotals {
  let count = 0;
  let volume = 0;
  for (const s of slices) {
    count += s.count;
    volume += s.volume_mpc3;
  }
  return { count, per_deg2: count / areaDeg2, volume_mpc3: volume };
}

/** Sum histograms that share a bin width onto one grid of edges. */
export function sumHistograms(hs: Histogram[], width: number): Histogram {
  const nonEmpty = hs.filter((h) => h.counts.length > 0 && h.counts.some((c) => c > 0));
  const first = hs[0]!;
  if (nonEmpty.length === 0) return first;
  let kMin = Infinity;
  let kMax = -Infinity;
  for (const h of nonEmpty) {
    kMin = Math.min(kMin, Math.round(h.edges[0]! / width));
    kMax = Math.max(kMax, Math.round(h.edges[h.edges.length - 1]! / width));
  }
  const edges: number[] = [];
  for (let k = kMin; k <= kMax; k++) edges.push(Number((k * width).toPrecision(12)));
  const counts = new Array<number>(kMax - kMin).fill(0);
  for (const h of nonEmpty) {
    const off = Math.round(h.edges[0]! / width) - kMin;
    h.counts.forEach((c, i) => (counts[off + i]! += c));
  }
  return { variable: first.variable, edges, counts };
}

export interface PredictOptions {
  /** Skip Poisson and cosmic-variance uncertainties (faster; used inside forecasts and plans). */
  noUncertainty?: boolean;
}

/** Add the uncertainty blocks to the slices and totals of parts made of populations. */
function addUncertainty(
  ctx: UncertaintyContext,
  slices: PredictionSlice[],
  totals: PredictionTotals,
  partsOf: (i: number) => { population: Population; count: number; volumeMpc3: number }[],
  totalParts: { population: Population; count: number; volumeMpc3: number }[],
): void {
  slices.forEach((s, i) => {
    const u = combinedUncertainty(ctx, partsOf(i), s.z_min, s.z_max, 0.5 * (s.z_min + s.z_max));
    if (u) s.uncertainty = u;
  });
  const zbar = countWeightedRedshift(slices);
  const first = slices[0]!;
  const last = slices[slices.length - 1]!;
  const u = combinedUncertainty(ctx, totalParts, first.z_min, last.z_max, zbar);
  if (u) {
    totals.uncertainty = u;
    totals.mean_redshift = zbar;
  }
}

export function predict(survey: Survey, options: PredictOptions = {}): Prediction {
  const cosmo = new FlatLambdaCDM(survey.cosmology);
  const edges = survey.sliceEdges;
  const perPop: PopulationPrediction[] = survey.populations.map((p) => {
    const slices = toSlices(countPopulation(survey, p, cosmo, edges), survey.areaDeg2);
    return { name: p.name, model: describeModel(survey, p), totals: totalsOf(slices, survey.areaDeg2), slices };
  });
  let slices: PredictionSlice[];
  if (perPop.length === 1) {
    slices = perPop[0]!.slices;
  } else {
    let cumulative = 0;
    slices = perPop[0]!.slices.map((s0, i) => {
      const parts = perPop.map((p) => p.slices[i]!);
      const count = parts.reduce((a, s) => a + s.count, 0);
      cumulative += count;
      return {
        ...s0,
        count,
        per_deg2: count / survey.areaDeg2,
        cumulative_count: cumulative,
        histogram: sumHistograms(parts.map((s) => s.histogram), survey.histogramWidth),
      };
    });
  }
  const totals = perPop.length === 1 ? perPop[0]!.totals : totalsOf(slices, survey.areaDeg2);
  if (!options.noUncertainty) {
    const ctx = uncertaintyContext(survey, cosmo);
    survey.populations.forEach((pop, k) => {
      const own = perPop[k]!;
      addUncertainty(
        ctx,
        own.slices,
        own.totals,
        (i) => [{ population: pop, count: own.slices[i]!.count, volumeMpc3: own.slices[i]!.volume_mpc3 }],
        [{ population: pop, count: own.totals.count, volumeMpc3: own.totals.volume_mpc3 }],
      );
    });
    if (perPop.length > 1) {
      addUncertainty(
        ctx,
        slices,
        totals,
        (i) => survey.populations.map((pop, k) => ({ population: pop, count: perPop[k]!.slices[i]!.count, volumeMpc3: perPop[k]!.slices[i]!.volume_mpc3 })),
        survey.populations.map((pop, k) => ({ population: pop, count: perPop[k]!.totals.count, volumeMpc3: perPop[k]!.totals.volume_mpc3 })),
      );
    }
  }
  return {
    format: 1,
    title: survey.title,
    cosmology: cosmologyJson(survey),
    area_deg2: survey.areaDeg2,
    redshift: { min: survey.redshift.min, max: survey.redshift.max },
    detection: detectionJson(survey),
    models: perPop.map((p) => p.model),
    limit_variable: limitVariable(survey, survey.populations[0]!),
    totals,
    slices,
    populations: perPop,
  };
}
