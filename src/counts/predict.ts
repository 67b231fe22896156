/**
 * predict: a Survey in, a Prediction (the JSON of specs/prediction.schema.json) out.
 *
 * Every population is counted over its own window on its own slice edges (Population.sliceEdges):
 * its own result under "populations". The top level holds everything the survey detects:
 * "totals" is the sum over the populations, each over its own window. Its breakdown depends on the
 * windows ("breakdown"):
 *  - "redshift": every population is counted over the same redshifts on the same edges (one
 *    population; several galaxy types in one window): "slices" are redshift slices holding the sum
 *    over populations (and each one's count), and they sum to the total;
 *  - "observed": the windows differ (lines seen at other redshifts through one filter): there are
 *    no top-level redshift slices; the breakdown is "observed_bins".
 * "observed_bins" (always present) gives per bin of the observed value (flux or magnitude) the
 * count of every population over its window and its share of the bin: the interloper fraction a
 * spectroscopic follow-up faces. Its bins sum to the total.
 *
 * Densities: per slice, the volume-averaged luminosity density of the detected sources and of all
 * sources (j = phi* L* Gamma(alpha+2), common practice; omitted where alpha <= -2), and, with
 * sfr_conversion, the star-formation-rate density (the conversion factor times the luminosity density).
 */
import { FlatCosmology } from '../cosmology/flat-cosmology.js';
import type { Population } from '../model/population.js';
import type { Survey } from '../model/survey.js';
import { MAX_HALVINGS, UNCONVERGED_SHARE, type Histogram, type SliceCount } from './engine.js';
import { countWith, type CountMemo } from './count-memo.js';
import { DEFAULT_MODEL_DRAWS, DEFAULT_MODEL_SEED, MAX_MODEL_DRAWS } from './model-draws.js';
import { refuseUndrawnModel } from '../model/model-uncertainty.js';
import { assertWholeOption } from '../errors.js';
import { MAX_SEED } from '../model/limits.js';
import { addPopulationSpreads, addTopSpreads } from './model-spread.js';
import { countPhotoZ, sumMigrations, type PhotoZCount, type PhotoZMigration } from './photo-z.js';
import { PHOTO_Z_REACH_SIGMA } from '../model/photo-z.js';
import { cosmologyJsonOf } from '../model/cosmology-json.js';
import type {
  LineFluxDetectionBlock,
  LuminosityDensity,
  MagnitudeDetectionBlock,
  ObservedBin,
  ObservedBins,
  PhotoZMigration as PhotoZMigrationJson,
  PopulationPrediction,
  Prediction,
  PredictionBase,
  PredictionSlice,
  PredictionTotals,
  SfrDensity,
} from '../model/outputs/prediction.js';
import {
  combinedUncertainty,
  totalUncertainty,
  uncertaintyContext,
  type TotalPart,
  type UncertaintyJson,
} from '../uncertainty/prediction.js';
import { describeModel } from '../population/describe.js';
import { predictionWarnings, unconvergedWarning } from './warnings.js';
import { mergeWarnings, warning, type Warning } from '../warnings.js';
import { precise } from '../render/format.js';
import { removingSelectionHint } from '../selection/describe.js';
import { surveyWarnings } from '../population/warnings.js';
import { checkOptions, checkSurvey } from '../model/arguments.js';

/** The detection block of the prediction: the survey's detection in the outputs' names and units. */
export function detectionJson(survey: Survey): PredictionBase['detection'] {
  const d = survey.detection;
  let out: PredictionBase['detection'];
  if (d.kind === 'line_flux') {
    const b: LineFluxDetectionBlock = { kind: 'line_flux', limit_cgs: d.limitCgs };
    if (d.limitGivenJyKms !== undefined) b.limit_jy_km_s = d.limitGivenJyKms;
    if (d.lineAngstrom !== undefined) b.line_angstrom = d.lineAngstrom;
    if (d.filter) {
      b.filter = {
        center_angstrom: d.filter.centerAngstrom,
        fwhm_angstrom: d.filter.fwhmAngstrom,
        profile: d.filter.profile,
      };
      if (d.filter.table) b.filter.file = d.filter.table.file;
    }
    out = b;
  } else if (d.kind === 'magnitude') {
    const b: MagnitudeDetectionBlock = {
      kind: 'magnitude',
      limit_ab_mag: d.limitMag,
      band_angstrom: d.bandAngstrom,
      beta: d.beta,
      igm: d.igm,
    };
    if (d.limitGivenJy !== undefined) b.limit_jy = d.limitGivenJy;
    if (d.limitGivenUnit !== undefined) b.limit_unit = d.limitGivenUnit;
    if (d.bandGivenHz !== undefined) b.band_ghz = d.bandGivenHz / 1e9;
    if (d.bandTable) b.band_file = d.bandTable.file;
    if (d.magnitudeSystem) {
      b.system = d.magnitudeSystem.system;
      b.vega_to_ab = d.magnitudeSystem.vegaToAb;
    }
    if (d.sed) b.sed_file = d.sed.spectrum.file;
    // the band's shape: detection.sed's, or the one the populations' own spectra go through
    if (d.spectrumBand) {
      b.band = {
        profile: d.spectrumBand.profile,
        center_angstrom: d.spectrumBand.centerAngstrom,
        fwhm_angstrom: d.spectrumBand.fwhmAngstrom,
      };
    }
    if (d.photoZ) b.photo_z = { sigma: d.photoZ.sigma, outlier_fraction: d.photoZ.outlierFraction };
    out = b;
  } else {
    out = { kind: 'threshold', limit: d.limit.source };
    if (d.photoZ) out.photo_z = { sigma: d.photoZ.sigma, outlier_fraction: d.photoZ.outlierFraction };
  }
  if (d.completeness) out.completeness = d.completeness;
  return out;
}

function limitVariable(survey: Survey, p: Population): PredictionBase['limit_variable'] {
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

function densityOf(
  lum: { detected: number; total?: number } | undefined,
  volume: number,
  unit: string,
): LuminosityDensity | undefined {
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

/**
 * A slice's limit as the outputs write it: null where it is infinite, a narrow-band filter passing
 * none of the population's lines at that redshift (no source is detected there).
 */
function limitOrNull(limit: number): number | null {
  return Number.isFinite(limit) ? limit : null;
}

function toSlices(
  counts: SliceCount[],
  areaDeg2: number,
  unit: string,
  sfrFactor?: number,
  trueCounts?: number[],
): PredictionSlice[] {
  let cumulative = 0;
  return counts.map((s, i) => {
    cumulative += s.count;
    const slice: PredictionSlice = {
      z_min: s.zMin,
      z_max: s.zMax,
      volume_mpc3: s.volumeMpc3,
      count: s.count,
      per_deg2: s.count / areaDeg2,
      cumulative_count: cumulative,
      limit_at_center: limitOrNull(s.limitAtCenter),
      histogram: s.histogram,
    };
    if (trueCounts) slice.count_true_redshift = trueCounts[i]!;
    const ld = densityOf(s.luminosity, s.volumeMpc3, unit);
    if (ld) slice.luminosity_density = ld;
    const sfr = sfrOf(ld, sfrFactor);
    if (sfr) slice.sfr_density_msun_yr_mpc3 = sfr;
    return slice;
  });
}

function totalsOf(
  counts: SliceCount[],
  areaDeg2: number,
  unit: string | undefined,
  sfrFactor?: number,
): PredictionTotals {
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
 * A narrow-band filter sets the window: the redshifts it puts the line at, named beside the limit
 * and the area, since a filter read in the wrong unit (a table in Angstrom under a wavelength_nm
 * header, read ten times redder) counts next to nothing without another sign (found by a trial user).
 */
function filterHint(
  populations: readonly { name: string; window: { min: number; max: number } }[],
  detection: Survey['detection'] | undefined,
  which: string | undefined,
): string {
  if (detection?.kind !== 'line_flux' || !detection.filter) return '';
  const ps = which === undefined ? populations : populations.filter((p) => p.name === which);
  if (ps.length === 0) return '';
  const lo = Math.min(...ps.map((p) => p.window.min));
  const hi = Math.max(...ps.map((p) => p.window.max));
  const table =
    detection.filter.profile === 'table'
      ? ' (a table in Angstrom under a wavelength_nm header reads ten times redder)'
      : '';
  return `, or detection.filter, which puts the line at z = ${fmtNum(lo)} to ${fmtNum(hi)}${table}`;
}

/**
 * Fewer than one source expected: in the whole survey (every population over its own window), or
 * from one population of several.
 */
export function detectionWarnings(
  populations: readonly { name: string; count: number; window: { min: number; max: number } }[],
  detection?: Survey['detection'],
  survey?: Survey,
): Warning[] {
  const all = populations.reduce((a, p) => a + p.count, 0);
  // the selection keys that may have removed them (a redshift selection of 0, deep dust, a high
  // equivalent-width cut), named beside the limit when the file has any
  const hint = (which?: string) =>
    'check detection.limit, the area and the luminosity function (a log10 given under a linear key such as l_star gives none)' +
    (survey
      ? removingSelectionHint(
          survey,
          which === undefined ? undefined : survey.populations.filter((p) => p.name === which),
        )
      : '') +
    filterHint(populations, detection, which) +
    brightLimitHint(detection);
  if (all < 1) {
    return [
      warning('no_detections', `fewer than one source is expected in the whole survey (${fmtNum(all)}): ${hint()}`),
    ];
  }
  if (populations.length < 2) return [];
  return populations
    .filter((p) => p.count < 1)
    .map((p) =>
      warning(
        'no_detections',
        `${p.name}: fewer than one source is expected over its window z = ${fmtNum(p.window.min)} to ${fmtNum(p.window.max)} (${fmtNum(p.count)}); if it should be seen, ${hint(p.name)}`,
      ),
    );
}

/**
 * A magnitude limit written as a plain number below 10 AB: brighter than any galaxy survey goes, most
 * likely a flux density written without its unit ("2e-29" reads as an AB magnitude of 2e-29).
 */
function brightLimitHint(d: Survey['detection'] | undefined): string {
  if (d?.kind !== 'magnitude' || d.limitGivenJy !== undefined || !(d.limitMag < BRIGHT_LIMIT_AB)) return '';
  return `; the limit, ${fmtNum(d.limitMag)} AB, is brighter than any survey's: a flux density needs its unit (e.g. limit: "2 uJy"), a plain number is an AB magnitude`;
}

/** A magnitude limit brighter than this (AB) is named in the no_detections warning. */
const BRIGHT_LIMIT_AB = 10;

export { predictionWarnings };

const fmtNum = (x: number): string => precise(x, 4);

export interface PredictOptions {
  /** Skip Poisson and cosmic-variance uncertainties (faster; used inside forecasts and plans). */
  noUncertainty?: boolean;
  /**
   * Draws of the populations' model_uncertainty (default 1000) and their seed (default 1); `draws: 0`
   * skips them; a count above 0 is refused where no population's model_uncertainty gives sigmas
   * (nothing to draw, or a draws_file's rows each taken once). `counts: true` gives the model
   * blocks of counts only (slices and totals, the same numbers as without it) and leaves out those of the histograms' bins and the luminosity and
   * star-formation densities (the explore page shows neither; the histograms' draws are about
   * half of the draws' work).
   */
  model?: { draws?: number; seed?: number; counts?: boolean };
  /**
   * Where the count engine's results of earlier predictions are kept (the explore page's
   * updates): read from there for the same inputs at any area (src/counts/count-memo.ts).
   */
  countMemo?: CountMemo;
}

/** The redshifts a population is counted over: its window cut by its slice edges (empty: max <= min). */
export function countedRange(p: Population): { min: number; max: number } {
  return {
    min: Math.max(p.window.min, p.sliceEdges[0]!),
    max: Math.min(p.window.max, p.sliceEdges[p.sliceEdges.length - 1]!),
  };
}

/**
 * True when every population is counted over the same redshifts on the same slice edges, so that
 * redshift slices can hold them all (the top-level breakdown "redshift").
 */
export function windowsCoincide(survey: Survey): boolean {
  const [first, ...rest] = survey.populations;
  const r0 = countedRange(first!);
  return rest.every((p) => {
    const r = countedRange(p);
    return sameEdges(p.sliceEdges, first!.sliceEdges) && r.min === r0.min && r.max === r0.max;
  });
}

/** Comoving volume of the union of redshift ranges over the survey's area. */
function unionVolume(survey: Survey, cosmo: FlatCosmology, ranges: { min: number; max: number }[]): number {
  const sorted = ranges.filter((r) => r.max > r.min).sort((a, b) => a.min - b.min);
  let volume = 0;
  let lo = -Infinity;
  let hi = -Infinity;
  for (const r of sorted) {
    if (r.min > hi) {
      if (hi > lo) volume += cosmo.comovingVolumeBetweenMpc3Sr(lo, hi);
      lo = r.min;
      hi = r.max;
    } else hi = Math.max(hi, r.max);
  }
  if (hi > lo) volume += cosmo.comovingVolumeBetweenMpc3Sr(lo, hi);
  return survey.areaSr * volume;
}

/** The observed bins: every population's histogram over its own slices, on one grid, with shares. */
function observedBins(survey: Survey, runs: { name: string; own: SliceCount[] }[]): ObservedBins {
  const width = survey.histogramWidth;
  const hists = runs.map((r) =>
    sumHistograms(
      r.own.map((s) => s.histogram),
      width,
    ),
  );
  const aligned = alignHistograms(hists, width);
  const bins: ObservedBin[] = aligned.edges.slice(0, -1).map((lo, b) => {
    const count = aligned.counts.reduce((a, row) => a + row[b]!, 0);
    const populations: ObservedBin['populations'] = {};
    runs.forEach((r, k) => {
      const c = aligned.counts[k]![b]!;
      populations[r.name] = { count: c, share: count > 0 ? Math.min(1, Math.max(0, c / count)) : 0 };
    });
    return { min: lo, max: aligned.edges[b + 1]!, count, per_deg2: count / survey.areaDeg2, populations };
  });
  return { variable: hists[0]!.variable, width, bins };
}

/** One population counted over its own window and slices: the engine's counts and its own result. */
interface PopulationRun {
  name: string;
  own: SliceCount[];
  pred: PopulationPrediction;
  /** With photometric redshifts: the counts by true redshift and the migration. */
  photoZ?: PhotoZCount;
}

/** The photo_z block of the outputs (specs/prediction.schema.json, photo_z_migration). */
function migrationJson(m: PhotoZMigration): PhotoZMigrationJson {
  const last = m.measuredCounts.length - 1;
  return {
    sigma: m.sigma,
    outlier_fraction: m.outlierFraction,
    reach_sigma: PHOTO_Z_REACH_SIGMA,
    true_range: { min: m.trueRange.min, max: m.trueRange.max },
    true_bins: m.trueBins.map((b) => ({ z_min: b.min, z_max: b.max })),
    measured_bins: m.measuredBins.map((b) => ({
      ...(b.min !== null ? { z_min: b.min } : {}),
      ...(b.max !== null ? { z_max: b.max } : {}),
    })),
    migration_matrix: m.matrix.map((row) => [...row]),
    true_counts: [...m.trueCounts],
    measured_counts: [...m.measuredCounts],
    lost_count: m.measuredCounts[0]! + m.measuredCounts[last]!,
  };
}

/** Every population over its own window and slice edges (with the engine's redshift profiles when uncertainties follow). */
function countPopulations(
  survey: Survey,
  cosmo: FlatCosmology,
  units: string[],
  profiles: boolean,
  withModel: boolean,
  memo?: CountMemo,
): PopulationRun[] {
  const d = survey.detection;
  const withPhotoZ = d.kind !== 'line_flux' && d.photoZ !== undefined;
  return survey.populations.map((p, i) => {
    const photoZ = withPhotoZ
      ? countPhotoZ(survey, p, cosmo, p.sliceEdges, { profile: profiles, ...(memo ? { memo } : {}) })
      : undefined;
    const own = photoZ
      ? photoZ.slices
      : countWith(memo)(survey, p, cosmo, p.sliceEdges, {
          profile: profiles,
          drawNodes: withModel && p.modelUncertainty !== undefined,
        });
    const sfr = p.sfrConversion?.factor;
    const pred: PopulationPrediction = {
      name: p.name,
      model: describeModel(survey, p),
      window: { min: p.window.min, max: p.window.max },
      totals: totalsOf(own, survey.areaDeg2, units[i], sfr),
      slices: toSlices(own, survey.areaDeg2, units[i]!, sfr, photoZ?.trueCounts),
    };
    if (photoZ) pred.photo_z = migrationJson(photoZ.migration);
    const run: PopulationRun = { name: p.name, own, pred };
    if (photoZ) run.photoZ = photoZ;
    return run;
  });
}

/**
 * The top-level slices of several populations counted on the same edges (breakdown "redshift"):
 * each slice the sum over populations, with each one's count; densities only when every
 * population's are in one unit.
 */
function summedSlices(
  survey: Survey,
  runs: PopulationRun[],
  units: string[],
): { slices: PredictionSlice[]; totals: PredictionTotals } {
  const sameUnit = units.every((u) => u === units[0]);
  let cumulative = 0;
  const topCounts: SliceCount[] = [];
  const slices = runs[0]!.own.map((first, i) => {
    const parts = runs.map((r) => r.own[i]!);
    const count = parts.reduce((a, sc) => a + sc.count, 0);
    cumulative += count;
    let lum: Lum | undefined = { detected: 0, total: 0 };
    for (const sc of parts) lum = addLum(lum, sc.luminosity);
    const histogram = sumHistograms(
      parts.map((sc) => sc.histogram),
      survey.histogramWidth,
    );
    const sc: SliceCount = {
      zMin: first.zMin,
      zMax: first.zMax,
      volumeMpc3: first.volumeMpc3,
      count,
      limitAtCenter: first.limitAtCenter,
      histogram,
    };
    if (lum && sameUnit) sc.luminosity = lum;
    topCounts.push(sc);
    const slice: PredictionSlice = {
      z_min: first.zMin,
      z_max: first.zMax,
      volume_mpc3: first.volumeMpc3,
      count,
      per_deg2: count / survey.areaDeg2,
      cumulative_count: cumulative,
      limit_at_center: limitOrNull(first.limitAtCenter),
      histogram,
      population_counts: Object.fromEntries(runs.map((r, k) => [r.name, parts[k]!.count])),
    };
    if (runs.every((r) => r.photoZ)) slice.count_true_redshift = runs.reduce((a, r) => a + r.photoZ!.trueCounts[i]!, 0);
    const ld = sameUnit ? densityOf(sc.luminosity, first.volumeMpc3, units[0]!) : undefined;
    if (ld) slice.luminosity_density = ld;
    const sfr = sameUnit
      ? sfrSum(
          survey,
          parts.map((x) => x.luminosity),
          first.volumeMpc3,
          units,
        )
      : undefined;
    if (sfr) slice.sfr_density_msun_yr_mpc3 = sfr;
    return slice;
  });
  const totals = totalsOf(topCounts, survey.areaDeg2, sameUnit ? units[0] : undefined);
  if (totals.luminosity_density) {
    const lums = runs.map((r) =>
      r.own.reduce<Lum | undefined>((a, sc) => addLum(a, sc.luminosity), { detected: 0, total: 0 }),
    );
    const sfr = sfrSum(survey, lums, totals.volume_mpc3, units);
    if (sfr) totals.sfr_density_msun_yr_mpc3 = sfr;
  }
  return { slices, totals };
}

/** Poisson and cosmic-variance uncertainties of every population's slices and totals, and of the top level's. */
function addUncertainties(
  survey: Survey,
  cosmo: FlatCosmology,
  runs: PopulationRun[],
  top: { slices: PredictionSlice[] | undefined; totals: PredictionTotals },
): Warning[] {
  const warnings: Warning[] = [];
  const ctx = uncertaintyContext(survey, cosmo);
  ctx.warnings = warnings;
  const partsOf = (k: number): TotalPart[] =>
    runs[k]!.own.map((sc) => ({
      population: survey.populations[k]!,
      count: sc.count,
      zMin: sc.zMin,
      zMax: sc.zMax,
      profile: sc.profile!,
    }));
  // Each population over its own window and slices.
  survey.populations.forEach((pop, k) => {
    const own = runs[k]!.pred;
    own.slices.forEach((sl) => {
      const u = combinedUncertainty(
        ctx,
        [{ population: pop, count: sl.count, volumeMpc3: sl.volume_mpc3 }],
        sl.z_min,
        sl.z_max,
        0.5 * (sl.z_min + sl.z_max),
      );
      if (u) sl.uncertainty = u;
    });
    setTotalUncertainty(own.totals, totalUncertainty(ctx, partsOf(k)));
  });
  if (survey.populations.length > 1) {
    // Top-level slices (several populations in one slice: their count-weighted bias).
    top.slices?.forEach((sl, i) => {
      const parts = survey.populations.map((pop, k) => ({
        population: pop,
        count: runs[k]!.own[i]!.count,
        volumeMpc3: sl.volume_mpc3,
      }));
      const u = combinedUncertainty(ctx, parts, sl.z_min, sl.z_max, 0.5 * (sl.z_min + sl.z_max));
      if (u) sl.uncertainty = u;
    });
    setTotalUncertainty(
      top.totals,
      totalUncertainty(
        ctx,
        survey.populations.flatMap((_, k) => partsOf(k)),
      ),
    );
  }
  return warnings;
}

export function predict(survey: Survey, options: PredictOptions = {}): Prediction {
  checkSurvey(survey, 'predict');
  checkOptions(options, 'predict', '{ model: { draws: 100 } }');
  const cosmo = new FlatCosmology(survey.cosmology);
  const units = survey.populations.map((p) => luminosityDensityUnit(survey, p));
  const withUncertainty = !options.noUncertainty;
  assertWholeOption(options.model?.draws, 'model.draws', 0, MAX_MODEL_DRAWS);
  assertWholeOption(options.model?.seed, 'model.seed', 0, MAX_SEED);
  // a count above 0 where nothing would be drawn that many times is refused, as predict --draws is
  if (options.model?.draws) refuseUndrawnModel(survey, 'model.draws', 'the count');
  const modelDraws = options.model?.draws ?? DEFAULT_MODEL_DRAWS;
  const withModel = withUncertainty && modelDraws > 0 && survey.populations.some((p) => p.modelUncertainty);
  const runs = countPopulations(survey, cosmo, units, withUncertainty, withModel, options.countMemo);
  const perPop = runs.map((r) => r.pred);
  const coincide = windowsCoincide(survey);

  // The top level: one population's own result; the sum of populations counted on the same
  // edges (breakdown "redshift"); or, windows that differ, the total over every window alone
  // (breakdown "observed": densities stay with each population).
  let top: { slices: PredictionSlice[] | undefined; totals: PredictionTotals };
  if (survey.populations.length === 1) top = { slices: perPop[0]!.slices, totals: perPop[0]!.totals };
  else if (coincide) top = summedSlices(survey, runs, units);
  else {
    const count = perPop.reduce((a, q) => a + q.totals.count, 0);
    top = {
      slices: undefined,
      totals: {
        count,
        per_deg2: count / survey.areaDeg2,
        volume_mpc3: unionVolume(survey, cosmo, survey.populations.map(countedRange)),
      },
    };
  }
  const uncertaintyWarnings = withUncertainty ? addUncertainties(survey, cosmo, runs, top) : [];
  if (withModel) {
    const draws = addPopulationSpreads(survey, cosmo, runs, {
      draws: modelDraws,
      seed: options.model?.seed ?? DEFAULT_MODEL_SEED,
      countsOnly: options.model?.counts === true,
      // a page that keeps counts between updates also moves the draws' tables to a new limit
      moveAcrossLimits: options.countMemo !== undefined,
    });
    if (survey.populations.length > 1) addTopSpreads(runs, draws, top);
    for (const r of runs) for (const sc of r.own) delete sc.drawNodes;
  }

  const ranges = survey.populations.map(countedRange);
  const r0 = runs[0]!.own;
  // (the keys in the order the JSON has always listed them)
  const head = {
    format: 1 as const,
    title: survey.title,
    cosmology: cosmologyJsonOf(survey.cosmology),
    area_deg2: survey.areaDeg2,
    redshift: coincide
      ? { min: r0[0]!.zMin, max: r0[r0.length - 1]!.zMax }
      : { min: Math.min(...ranges.map((r) => r.min)), max: Math.max(...ranges.map((r) => r.max)) },
    detection: detectionJson(survey),
    models: perPop.map((q) => q.model),
    limit_variable: limitVariable(survey, survey.populations[0]!),
  };
  const migrations = runs.flatMap((r) => (r.photoZ && coincide ? [r.photoZ.migration] : []));
  const tail = {
    ...(migrations.length > 0 ? { photo_z: migrationJson(sumMigrations(migrations)) } : {}),
    populations: perPop,
    observed_bins: observedBins(survey, runs),
    warnings: mergeWarnings(
      surveyWarnings(survey),
      predictionWarnings(survey),
      detectionWarnings(
        perPop.map((p) => ({ name: p.name, count: p.totals.count, window: p.window })),
        survey.detection,
        survey,
      ),
      uncertaintyWarnings,
      runs.flatMap((r) => {
        const w = unconvergedWarning(r.name, r.own, UNCONVERGED_SHARE, MAX_HALVINGS);
        return w ? [w] : [];
      }),
    ),
  };
  return coincide
    ? { ...head, breakdown: 'redshift', totals: top.totals, slices: top.slices!, ...tail }
    : { ...head, breakdown: 'observed', totals: top.totals, ...tail };
}

function setTotalUncertainty(
  t: PredictionTotals,
  u: { block: UncertaintyJson; meanRedshift: number } | undefined,
): void {
  if (!u) return;
  t.uncertainty = u.block;
  t.mean_redshift = u.meanRedshift;
}

/** Sum over populations with sfr_conversion of factor x (their luminosity / volume); undefined when none has one. */
function sfrSum(survey: Survey, lums: (Lum | undefined)[], volume: number, units: string[]): SfrDensity | undefined {
  if (!survey.populations.some((p) => p.sfrConversion)) return undefined;
  const out: SfrDensity = { detected: 0, total: 0 };
  survey.populations.forEach((p, k) => {
    if (!p.sfrConversion) return;
    const sp = sfrOf(densityOf(lums[k], volume, units[k]!), p.sfrConversion.factor);
    if (!sp) return;
    out.detected += sp.detected;
    if (out.total !== undefined) out.total = sp.total === undefined ? undefined : out.total + sp.total;
  });
  if (out.total === undefined) delete out.total;
  return out;
}
