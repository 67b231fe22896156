/**
 * The model blocks of a prediction (specs/prediction.schema.json, model_spread): each population's
 * slices and totals under the draws of its model_uncertainty (src/counts/model-draws.ts), and the
 * top level's. A population without model_uncertainty contributes its plain counts to every draw.
 * Populations are independent: the top level's draw i holds draw i of every population (a draws
 * file with fewer rows than the longest list of draws is used cyclically, row i mod rows).
 */
import type { FlatCosmology } from '../cosmology/flat-cosmology.js';
import type { Survey } from '../model/survey.js';
import type {
  DensitySpread,
  LuminosityDensity,
  ModelSpread,
  PopulationPrediction,
  PredictionSlice,
  PredictionTotals,
  SfrDensity,
} from '../model/outputs/prediction.js';
import type { SliceCount } from './engine.js';
import {
  drawModelOffsets,
  HISTOGRAM_DRAWS,
  percentilesOf,
  populationDraws,
  type PopulationDraws,
} from './model-draws.js';

export interface ModelDrawSettings {
  draws: number;
  seed: number;
  /** Only the counts' model blocks (no histogram bins, no densities): the counts' numbers are unchanged. */
  countsOnly?: boolean;
  /** Level-1 tables may be moved from another limit's (an explore page: see populationDraws). */
  moveAcrossLimits?: boolean;
}

/** The five percentiles and the fraction of a count's draws. */
export function modelSpread(values: ArrayLike<number>): ModelSpread {
  const [p2_5, p16, p50, p84, p97_5] = percentilesOf(values) as [number, number, number, number, number];
  return { draws: values.length, p2_5, p16, p50, p84, p97_5, fraction: p50 > 0 ? (p84 - p16) / (2 * p50) : 0 };
}

function percentiles(values: ArrayLike<number>, scale: number): DensitySpread['detected'] {
  const [p2_5, p16, p50, p84, p97_5] = percentilesOf(values).map((v) => v * scale) as [
    number,
    number,
    number,
    number,
    number,
  ];
  return { p2_5, p16, p50, p84, p97_5 };
}

function densitySpread(
  detected: ArrayLike<number>,
  total: ArrayLike<number> | undefined,
  scale: number,
): DensitySpread {
  const d: DensitySpread = { draws: detected.length, detected: percentiles(detected, scale) };
  if (total) d.total = percentiles(total, scale);
  return d;
}

function addDensities(
  ld: LuminosityDensity | undefined,
  sfr: SfrDensity | undefined,
  lum: { detected: Float64Array; total?: Float64Array } | undefined,
  volume: number,
  factor: number | undefined,
): void {
  if (!ld || !lum || !(volume > 0)) return;
  ld.model = densitySpread(lum.detected, ld.total !== undefined ? lum.total : undefined, 1 / volume);
  if (sfr && factor !== undefined)
    sfr.model = densitySpread(lum.detected, sfr.total !== undefined ? lum.total : undefined, factor / volume);
}

/** Sum of arrays (each used cyclically up to n). */
function sumDraws(parts: readonly ArrayLike<number>[], n: number): Float64Array {
  const out = new Float64Array(n);
  for (const p of parts) for (let i = 0; i < n; i++) out[i]! += p[i % p.length]!;
  return out;
}

/**
 * Draw every population that has model_uncertainty (its slices counted with the engine's nodes)
 * and add the model blocks to its own slices and totals. Returns the per-population draws (undefined
 * for a population without model_uncertainty).
 */
export function addPopulationSpreads(
  survey: Survey,
  cosmo: FlatCosmology,
  runs: readonly { own: SliceCount[]; pred: PopulationPrediction }[],
  settings: ModelDrawSettings,
): (PopulationDraws | undefined)[] {
  return survey.populations.map((pop, k) => {
    const mu = pop.modelUncertainty;
    if (!mu) return undefined;
    const run = runs[k]!;
    const offsets = drawModelOffsets(mu, pop.components.length, settings.draws, settings.seed, k);
    const withLum = !settings.countsOnly && run.own.some((s) => s.luminosity !== undefined);
    const d = populationDraws(survey, pop, cosmo, run.own, offsets, {
      luminosity: withLum,
      histogramDraws: settings.countsOnly ? 0 : Math.min(HISTOGRAM_DRAWS, offsets.length),
      moveAcrossLimits: settings.moveAcrossLimits === true,
    });
    const factor = pop.sfrConversion?.factor;
    run.pred.slices.forEach((sl, j) => {
      sl.model = modelSpread(d.counts[j]!);
      const h = d.histograms?.[j];
      if (h && sl.histogram.counts.length > 0) {
        const p = h.bins.map((b) => percentilesOf(b, [0.16, 0.84]));
        sl.histogram.model = { draws: h.draws, p16: p.map((x) => x[0]!), p84: p.map((x) => x[1]!) };
      }
      const lum = d.luminosity ? { detected: d.luminosity.detected[j]!, total: d.luminosity.total?.[j] } : undefined;
      addDensities(sl.luminosity_density, sl.sfr_density_msun_yr_mpc3, lum, sl.volume_mpc3, factor);
    });
    const t = run.pred.totals;
    t.model = modelSpread(sumDraws(d.counts, d.draws));
    if (d.luminosity) {
      const lt = d.luminosity.total;
      addDensities(
        t.luminosity_density,
        t.sfr_density_msun_yr_mpc3,
        { detected: sumDraws(d.luminosity.detected, d.draws), total: lt ? sumDraws(lt, d.draws) : undefined },
        t.volume_mpc3,
        factor,
      );
    }
    return d;
  });
}

/**
 * The top level of several populations: slices on common edges (breakdown redshift) and the
 * totals, each draw the sum of every population's draw (plain counts where a population has no
 * model_uncertainty). Densities stay with each population.
 */
export function addTopSpreads(
  runs: readonly { own: SliceCount[] }[],
  draws: readonly (PopulationDraws | undefined)[],
  top: { slices: PredictionSlice[] | undefined; totals: PredictionTotals },
): void {
  const n = Math.max(0, ...draws.map((d) => d?.draws ?? 0));
  if (n === 0) return;
  const sliceDraws = (k: number, j: number): ArrayLike<number> => draws[k]?.counts[j] ?? [runs[k]!.own[j]!.count];
  top.slices?.forEach((sl, j) => {
    sl.model = modelSpread(
      sumDraws(
        runs.map((_, k) => sliceDraws(k, j)),
        n,
      ),
    );
  });
  const totals = runs.map((r, k) =>
    sumDraws(
      r.own.map((_, j) => sliceDraws(k, j)),
      draws[k]?.draws ?? 1,
    ),
  );
  top.totals.model = modelSpread(sumDraws(totals, n));
}
