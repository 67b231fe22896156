/**
 * predict: a Survey in, a Prediction (the JSON of outputs.md, "predict") out.
 *
 * Several populations (issue 7): each population's own result ("populations") is the
 * single-population result over its own window and slice edges (Population.sliceEdges). The
 * top-level slices follow the first population's window (or the file's edges) and hold the sum
 * over populations of their counts inside each slice, so a population at other redshifts adds only
 * where its window overlaps; "all_populations" is the plain sum of the populations' own totals.
 * "observed_shares" gives each population's count and share per bin of the observed value over
 * its whole window: the interloper fraction a follow-up would face.
 *
 * Densities: per slice, the volume-averaged luminosity density of the detected sources and of all
 * sources (j = phi* L* Gamma(alpha+2), common practice; omitted where alpha <= -2), and, with
 * sfr_conversion, the star-formation-rate density (the conversion factor times the luminosity density).
 */
import { FlatLambdaCDM } from '../cosmology/flat-lcdm.js';
import type { Population, Survey } from '../survey/types.js';
import { countPopulation, type Histogram, type SliceCount } from './engine.js';
import { cosmologyJsonOf, type CosmologyJsonShape } from '../cosmology/json.js';
import {
  combinedUncertainty,
  countWeightedRedshift,
  uncertaintyContext,
  type UncertaintyContext,
  type UncertaintyJson,
  type UncertaintyMemo,
} from '../uncertainty/prediction.js';
import { describeModel, type ModelDescription } from '../population/describe.js';
import { bandRedEdgeAngstrom, LYMAN_ALPHA_ANGSTROM } from '../selection/igm.js';
import { mergeWarnings, warning, type Warning } from '../warnings.js';
import { surveyWarnings } from '../survey/warnings.js';

/** Luminosity density of a slice or a window (volume-averaged over it). */
export interface LuminosityDensity {
  /** erg s^-1 Mpc^-3 (line luminosity), erg s^-1 Hz^-1 Mpc^-3 (magnitude variable, at the rest wavelength), or "<quantity> Mpc^-3". */
  unit: string;
  /** Of the detected sources (completeness-weighted). */
  detected: number;
  /** Of all sources, j = phi* L* Gamma(alpha+2) summed over components; absent when some alpha <= -2. */
  total?: number;
  /** detected / total, when total is given and above 0. */
  fraction?: number;
  /** Why total and fraction are absent. */
  note?: string;
}

export interface SfrDensity {
  detected: number;
  total?: number;
}

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
  luminosity_density?: LuminosityDensity;
  sfr_density_msun_yr_mpc3?: SfrDensity;
  /** Top-level slices: each population's count inside the slice. */
  population_counts?: Record<string, number>;
}

export interface PredictionTotals {
  count: number;
  per_deg2: number;
  volume_mpc3: number;
  uncertainty?: UncertaintyJson;
  /** Count-weighted mean redshift, where the total's cosmic variance is evaluated. */
  mean_redshift?: number;
  luminosity_density?: LuminosityDensity;
  sfr_density_msun_yr_mpc3?: SfrDensity;
}

export interface PopulationPrediction {
  name: string;
  model: ModelDescription;
  /** The population's whole window; its slices cover it unless the file gives edges. */
  window: { min: number; max: number };
  totals: PredictionTotals;
  slices: PredictionSlice[];
}

/** Per observed-value bin over each population's whole window: counts and shares of the total. */
export interface ObservedShares {
  variable: string;
  edges: number[];
  counts: Record<string, number[]>;
  /** counts / total per bin, in [0, 1]; 0 where the total is 0. */
  shares: Record<string, number[]>;
}

export type CosmologyJson = CosmologyJsonShape;

export interface Prediction {
  format: 1;
  title: string;
  cosmology: CosmologyJson;
  area_deg2: number;
  /** The window the top-level slices cover (the first population's, or the span of explicit edges). */
  redshift: { min: number; max: number };
  detection: Record<string, unknown>;
  /** The assumed model of every population, as written and as evaluated at the window's middle. */
  models: ModelDescription[];
  /** Which variable the limits are in: "log10_luminosity" | "log10_quantity" | "absolute_magnitude". */
  limit_variable: string;
  /** Sum over populations of their counts inside the top-level slices. */
  totals: PredictionTotals;
  slices: PredictionSlice[];
  /** The plain sum of the populations' own totals (each over its own window and slices). */
  all_populations: { count: number; per_deg2: number };
  populations: PopulationPrediction[];
  observed_shares: ObservedShares;
  /** Things the reader should know (also printed on stderr by the CLI); see src/warnings.ts. */
  warnings: Warning[];
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
    if (d.filter) {
      const f: Record<string, unknown> = { center_angstrom: d.filter.centerAngstrom, fwhm_angstrom: d.filter.fwhmAngstrom, profile: d.filter.profile };
      if (d.filter.table) f.file = d.filter.table.file;
      base.filter = f;
    }
  } else if (d.kind === 'magnitude') {
    base.limit_ab_mag = d.limitMag;
    base.band_angstrom = d.bandAngstrom;
    if (d.bandTable) base.band_file = d.bandTable.file;
    base.beta = d.beta;
    base.igm = d.igm;
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

const DIVERGES = 'total and fraction omitted: the luminosity density diverges at the faint end where alpha <= -2';

/** The unit luminosity densities of a population are given in. */
export function luminosityDensityUnit(survey: Survey, p: Population): string {
  if (p.variable === 'magnitude') return 'erg s^-1 Hz^-1 Mpc^-3';
  if (survey.detection.kind === 'threshold') return `${p.quantity ?? 'quantity'} Mpc^-3`;
  return 'erg s^-1 Mpc^-3';
}

function densityOf(lum: { detected: number; total?: number } | undefined, volume: number, unit: string): LuminosityDensity | undefined {
  if (!lum || !(volume > 0)) return undefined;
  const d: LuminosityDensity = { unit, detected: lum.detected / volume };
  if (lum.total === undefined) d.note = DIVERGES;
  else {
    d.total = lum.total / volume;
    if (d.total > 0) d.fraction = d.detected / d.total;
  }
  return d;
}

function sfrOf(ld: LuminosityDensity | undefined, factor: number | undefined): SfrDensity | undefined {
  if (!ld || factor === undefined) return undefined;
  const s: SfrDensity = { detected: factor * ld.detected };
  if (ld.total !== undefined) s.total = factor * ld.total;
  return s;
}

type Lum = { detected: number; total?: number };

function addLum(a: Lum | undefined, b: Lum | undefined): Lum | undefined {
  if (!a || !b) return undefined;
  const out: Lum = { detected: a.detected + b.detected };
  if (a.total !== undefined && b.total !== undefined) out.total = a.total + b.total;
  return out;
}

function toSlices(counts: SliceCount[], areaDeg2: number, unit: string, sfrFactor?: number): PredictionSlice[] {
  let cumulative = 0;
  return counts.map((s) => {
    cumulative += s.count;
    const slice: PredictionSlice = {
      z_min: s.zMin,
      z_max: s.zMax,
      volume_mpc3: s.volumeMpc3,
      count: s.count,
      per_deg2: s.count / areaDeg2,
      cumulative_count: cumulative,
      limit_at_center: s.limitAtCenter,
      histogram: s.histogram,
    };
    const ld = densityOf(s.luminosity, s.volumeMpc3, unit);
    if (ld) slice.luminosity_density = ld;
    const sfr = sfrOf(ld, sfrFactor);
    if (sfr) slice.sfr_density_msun_yr_mpc3 = sfr;
    return slice;
  });
}

function totalsOf(counts: SliceCount[], areaDeg2: number, unit: string | undefined, sfrFactor?: number): PredictionTotals {
  let count = 0;
  let volume = 0;
  let lum: Lum | undefined = { detected: 0, total: 0 };
  for (const s of counts) {
    count += s.count;
    volume += s.volumeMpc3;
    lum = addLum(lum, s.luminosity);
  }
  const t: PredictionTotals = { count, per_deg2: count / areaDeg2, volume_mpc3: volume };
  const ld = unit !== undefined ? densityOf(lum, volume, unit) : undefined;
  if (ld) t.luminosity_density = ld;
  const sfr = sfrOf(ld, sfrFactor);
  if (sfr) t.sfr_density_msun_yr_mpc3 = sfr;
  return t;
}

/** Put histograms that share a bin width onto one grid of edges (multiples of the width). */
export function alignHistograms(hs: Histogram[], width: number): { edges: number[]; counts: number[][] } {
  const nonEmpty = hs.filter((h) => h.counts.length > 0 && h.counts.some((c) => c > 0));
  if (nonEmpty.length === 0) {
    const h = hs.find((x) => x.edges.length > 1);
    const edges = h ? [...h.edges] : [0, width];
    return { edges, counts: hs.map(() => new Array<number>(edges.length - 1).fill(0)) };
  }
  let kMin = Infinity;
  let kMax = -Infinity;
  for (const h of nonEmpty) {
    kMin = Math.min(kMin, Math.round(h.edges[0]! / width));
    kMax = Math.max(kMax, Math.round(h.edges[h.edges.length - 1]! / width));
  }
  const edges: number[] = [];
  for (let k = kMin; k <= kMax; k++) edges.push(Number((k * width).toPrecision(12)));
  const counts = hs.map((h) => {
    const row = new Array<number>(kMax - kMin).fill(0);
    if (h.counts.length === 0 || !h.counts.some((c) => c > 0)) return row;
    const off = Math.round(h.edges[0]! / width) - kMin;
    h.counts.forEach((c, i) => (row[off + i]! += c));
    return row;
  });
  return { edges, counts };
}

/** Sum histograms that share a bin width onto one grid of edges. */
export function sumHistograms(hs: Histogram[], width: number): Histogram {
  const first = hs[0]!;
  const a = alignHistograms(hs, width);
  const counts = new Array<number>(a.edges.length - 1).fill(0);
  for (const row of a.counts) row.forEach((c, i) => (counts[i]! += c));
  return { variable: first.variable, edges: a.edges, counts };
}

function sameEdges(a: readonly number[], b: readonly number[]): boolean {
  return a.length === b.length && a.every((x, i) => x === b[i]);
}

/**
 * Warnings about the band and the slices (the magnitude kind's Lyman-alpha check; populations
 * outside the slices), for the given populations (default: all).
 */
export function predictionWarnings(survey: Survey, populations: readonly Population[] = survey.populations): Warning[] {
  const out: Warning[] = [];
  const d = survey.detection;
  if (d.kind === 'magnitude') {
    const red = bandRedEdgeAngstrom(d.bandAngstrom, d.bandTable);
    for (const p of populations) {
      const zb = red / LYMAN_ALPHA_ANGSTROM - 1;
      if (zb < p.window.max) {
        const from = Math.max(zb, p.window.min);
        const what = d.bandTable ? 'the whole band (to its red edge at ' + fmtNum(red) + ' A)' : 'the band (effective wavelength ' + fmtNum(red) + ' A)';
        out.push(warning(
          'band_blueward_of_lyman_alpha',
          `${p.name}: at z > ${fmtNum(from)} (its window is z = ${fmtNum(p.window.min)} to ${fmtNum(p.window.max)}) ${what} lies blueward of rest-frame Lyman alpha (1216 A); ` +
            (d.igm === 'madau1995'
              ? 'the counts there include the Madau 1995 mean intergalactic transmission, and the power-law spectrum is extrapolated below 1216 A'
              : 'no intergalactic attenuation is applied there (detection.igm is none), so those counts are too high; consider igm: madau1995'),
        ));
      }
    }
  }
  for (const p of populations) {
    // Only explicit edges can leave a population's own slices outside its window.
    const lo = p.sliceEdges[0]!;
    const hi = p.sliceEdges[p.sliceEdges.length - 1]!;
    if (p.window.max <= lo || p.window.min >= hi) {
      out.push(warning(
        'population_outside_slices',
        `${p.name}: its window z = ${fmtNum(p.window.min)} to ${fmtNum(p.window.max)} lies outside the slice edges (z = ${fmtNum(lo)} to ${fmtNum(hi)}); it counts 0 in its own slices, and observed_shares still covers its whole window`,
      ));
    }
  }
  return out;
}

/**
 * Fewer than one source expected: in the whole survey (every population over its own window), or
 * from one population of several.
 */
export function detectionWarnings(populations: readonly { name: string; count: number; window: { min: number; max: number } }[]): Warning[] {
  const all = populations.reduce((a, p) => a + p.count, 0);
  const hint = 'check detection.limit, the area and the luminosity function (a log10 given under a linear key such as l_star gives none)';
  if (all < 1) {
    return [warning('no_detections', `fewer than one source is expected in the whole survey (${fmtNum(all)}): ${hint}`)];
  }
  if (populations.length < 2) return [];
  return populations
    .filter((p) => p.count < 1)
    .map((p) => warning('no_detections', `${p.name}: fewer than one source is expected over its window z = ${fmtNum(p.window.min)} to ${fmtNum(p.window.max)} (${fmtNum(p.count)}); if it should be seen, ${hint}`));
}

function fmtNum(x: number): string {
  return String(Number(x.toPrecision(4)));
}

export interface PredictOptions {
  /** Skip Poisson and cosmic-variance uncertainties (faster; used inside forecasts and plans). */
  noUncertainty?: boolean;
  /** Keep the uncertainty blocks computed here for a later forecast of the same survey (report). */
  uncertaintyMemo?: UncertaintyMemo;
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
  const width = survey.histogramWidth;
  const units = survey.populations.map((p) => luminosityDensityUnit(survey, p));
  const runs = survey.populations.map((p, i) => {
    const own = countPopulation(survey, p, cosmo, p.sliceEdges);
    const onTop = sameEdges(p.sliceEdges, edges) ? own : countPopulation(survey, p, cosmo, edges);
    const covers = p.sliceEdges[0] === p.window.min && p.sliceEdges[p.sliceEdges.length - 1] === p.window.max;
    const whole = covers ? own : countPopulation(survey, p, cosmo, [p.window.min, p.window.max]);
    const sfr = p.sfrConversion?.factor;
    const pred: PopulationPrediction = {
      name: p.name,
      model: describeModel(survey, p),
      window: { min: p.window.min, max: p.window.max },
      totals: totalsOf(own, survey.areaDeg2, units[i], sfr),
      slices: toSlices(own, survey.areaDeg2, units[i]!, sfr),
    };
    return { pred, onTop, whole };
  });
  const perPop = runs.map((r) => r.pred);

  // Top-level slices: the sum over populations of their counts inside each slice.
  const sameUnit = units.every((u) => u === units[0]);
  const sfrPops = survey.populations.filter((p) => p.sfrConversion);
  let cumulative = 0;
  const topCounts: SliceCount[] = [];
  const slices: PredictionSlice[] = edges.slice(0, -1).map((_, i) => {
    const parts = runs.map((r) => r.onTop[i]!);
    const first = parts[0]!;
    const count = parts.reduce((a, s) => a + s.count, 0);
    cumulative += count;
    let lum: Lum | undefined = { detected: 0, total: 0 };
    for (const s of parts) lum = addLum(lum, s.luminosity);
    const histogram = parts.length === 1 ? first.histogram : sumHistograms(parts.map((s) => s.histogram), width);
    const sc: SliceCount = { ...first, count, histogram };
    if (lum && sameUnit) sc.luminosity = lum;
    else delete sc.luminosity;
    topCounts.push(sc);
    const slice: PredictionSlice = {
      z_min: first.zMin,
      z_max: first.zMax,
      volume_mpc3: first.volumeMpc3,
      count,
      per_deg2: count / survey.areaDeg2,
      cumulative_count: cumulative,
      limit_at_center: first.limitAtCenter,
      histogram: sc.histogram,
      population_counts: Object.fromEntries(survey.populations.map((p, k) => [p.name, parts[k]!.count])),
    };
    const ld = sameUnit ? densityOf(sc.luminosity, first.volumeMpc3, units[0]!) : undefined;
    if (ld) slice.luminosity_density = ld;
    if (sfrPops.length > 0 && sameUnit) {
      const s: SfrDensity = { detected: 0, total: 0 };
      survey.populations.forEach((p, k) => {
        if (!p.sfrConversion) return;
        const part = densityOf(parts[k]!.luminosity, first.volumeMpc3, units[k]!);
        const sp = sfrOf(part, p.sfrConversion.factor);
        if (!sp) return;
        s.detected += sp.detected;
        if (s.total !== undefined) s.total = sp.total === undefined ? undefined : s.total + sp.total;
      });
      if (s.total === undefined) delete s.total;
      slice.sfr_density_msun_yr_mpc3 = s;
    }
    return slice;
  });
  const totals = totalsOf(topCounts, survey.areaDeg2, sameUnit ? units[0] : undefined);
  if (sfrPops.length > 0 && totals.luminosity_density) {
    // sum over populations of factor x (their luminosity inside the slices / the slices' volume)
    const sfr: SfrDensity = { detected: 0, total: 0 };
    survey.populations.forEach((p, k) => {
      if (!p.sfrConversion) return;
      let lum: Lum | undefined = { detected: 0, total: 0 };
      for (const s of runs[k]!.onTop) lum = addLum(lum, s.luminosity);
      const sp = sfrOf(densityOf(lum, totals.volume_mpc3, units[k]!), p.sfrConversion.factor);
      if (!sp) return;
      sfr.detected += sp.detected;
      if (sfr.total !== undefined) sfr.total = sp.total === undefined ? undefined : sfr.total + sp.total;
    });
    if (sfr.total === undefined) delete sfr.total;
    totals.sfr_density_msun_yr_mpc3 = sfr;
  }
  const uncertaintyWarnings: Warning[] = [];
  if (!options.noUncertainty) {
    const ctx = uncertaintyContext(survey, cosmo);
    ctx.warnings = uncertaintyWarnings;
    if (options.uncertaintyMemo) ctx.memo = options.uncertaintyMemo;
    // Each population over its own window and slices.
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
    const single = perPop.length === 1 && sameEdges(survey.populations[0]!.sliceEdges, edges);
    if (single) {
      // The top-level slices are the population's own: share its blocks.
      slices.forEach((sl, i) => {
        const u = perPop[0]!.slices[i]!.uncertainty;
        if (u) sl.uncertainty = u;
      });
      const tu = perPop[0]!.totals.uncertainty;
      if (tu) {
        totals.uncertainty = tu;
        totals.mean_redshift = perPop[0]!.totals.mean_redshift!;
      }
    } else {
      addUncertainty(
        ctx,
        slices,
        totals,
        (i) => survey.populations.map((pop, k) => ({ population: pop, count: runs[k]!.onTop[i]!.count, volumeMpc3: runs[k]!.onTop[i]!.volumeMpc3 })),
        survey.populations.map((pop, k) => ({
          population: pop,
          count: runs[k]!.onTop.reduce((x, sc) => x + sc.count, 0),
          volumeMpc3: totals.volume_mpc3,
        })),
      );
    }
  }

  // The interloper view: each population's histogram over its whole window.
  const wholeHists = runs.map((r) => sumHistograms(r.whole.map((s) => s.histogram), width));
  const aligned = alignHistograms(wholeHists, width);
  const binTotals = aligned.edges.slice(0, -1).map((_, b) => aligned.counts.reduce((a, row) => a + row[b]!, 0));
  const observed_shares: ObservedShares = {
    variable: wholeHists[0]!.variable,
    edges: aligned.edges,
    counts: Object.fromEntries(survey.populations.map((p, k) => [p.name, aligned.counts[k]!])),
    shares: Object.fromEntries(
      survey.populations.map((p, k) => [p.name, aligned.counts[k]!.map((c, b) => (binTotals[b]! > 0 ? Math.min(1, Math.max(0, c / binTotals[b]!)) : 0))]),
    ),
  };
  const allCount = perPop.reduce((a, p) => a + p.totals.count, 0);

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
    all_populations: { count: allCount, per_deg2: allCount / survey.areaDeg2 },
    populations: perPop,
    observed_shares,
    warnings: mergeWarnings(
      surveyWarnings(survey),
      predictionWarnings(survey),
      detectionWarnings(perPop.map((p) => ({ name: p.name, count: p.totals.count, window: p.window }))),
      uncertaintyWarnings,
    ),
  };
}
