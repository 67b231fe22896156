/**
 * The one place the forecast gets its per-slice cosmic-variance fractions from: the uncertainty
 * layer (src/uncertainty/prediction.ts), exactly as `predict` reports them for one population:
 * per slice, b sigma_dm / sqrt(field count), with sigma_dm the rms linear matter fluctuation in one
 * field's box at the slice's middle redshift and b the population's bias (given, or "auto" by
 * abundance matching to the slice's count). A slice with under 1e-6 expected sources gets 0: its
 * nuisance cannot change the forecast (b_i b_i^T / (N_i + 1/sigma_i^2) vanishes with N_i for any
 * sigma_i), and abundance matching is undefined for so rare a population (the requirement search
 * meets such slices at shallow trial limits).
 * The fractions depend on the area (field sizes) and on the limit (the matched bias), so the
 * requirement search asks again for every trial survey.
 */
import { FlatCosmology } from '../cosmology/flat-cosmology.js';
import { countPopulation } from '../counts/engine.js';
import type { Population } from '../model/population.js';
import type { Survey } from '../model/survey.js';
import {
  singleUncertainty,
  slicesCorrelation,
  uncertaintyContext,
  type UncertaintyMemo,
} from '../uncertainty/prediction.js';
import type { Warning } from '../warnings.js';

const NEGLIGIBLE_COUNT = 1e-6;

/**
 * Per-slice cosmic-variance fractions of `population` in `survey` on `edges`; the warnings their
 * computation raises (abundance matching held at a mass bound) are added to `warnings` when given.
 */
export type CosmicVarianceSource = (
  survey: Survey,
  edges: readonly number[],
  population: Population,
  warnings?: Warning[],
  /** The count engine's node-order integrand by z, shared with the forecast's grid (EngineOptions.hardCounts). */
  hardCounts?: Map<number, number>,
) => number[];

export const cosmicVarianceInput: CosmicVarianceSource = (survey, edges, population, warnings, hardCounts) =>
  fractions(survey, edges, population, undefined, warnings, hardCounts);

/**
 * The same fractions, read from `memo` (filled by predict of the same survey, see
 * UncertaintyMemo) for every slice whose count, volume and redshifts are bit for bit those predict
 * used, and computed for the others: the numbers are those of cosmicVarianceInput.
 */
export function cosmicVarianceInputWith(memo: UncertaintyMemo): CosmicVarianceSource {
  return (survey, edges, population, warnings, hardCounts) =>
    fractions(survey, edges, population, memo, warnings, hardCounts);
}

function fractions(
  survey: Survey,
  edges: readonly number[],
  population: Population,
  memo?: UncertaintyMemo,
  warnings?: Warning[],
  hardCounts?: Map<number, number>,
): number[] {
  const cosmo = new FlatCosmology(survey.cosmology);
  const ctx = uncertaintyContext(survey, cosmo);
  if (memo) ctx.memo = memo;
  if (warnings) ctx.warnings = warnings;
  // predict's own counts when the memo holds them for this population, detection and edges
  const counts =
    (memo?.serves(survey) ? memo.counts(population, survey.detection, edges) : undefined) ??
    countPopulation(
      survey,
      population,
      cosmo,
      edges,
      hardCounts ? { noHistogram: true, hardCounts } : { noHistogram: true },
    );
  return counts.map((s) =>
    s.count < NEGLIGIBLE_COUNT
      ? 0
      : (singleUncertainty(
          ctx,
          { population, count: s.count, volumeMpc3: s.volumeMpc3 },
          s.zMin,
          s.zMax,
          0.5 * (s.zMin + s.zMax),
        )?.cosmic_variance_fraction ?? 0),
  );
}

/**
 * The correlation of the slices' fluctuations in one field (slicesCorrelation of
 * src/uncertainty/prediction.ts): it depends on the cosmology, the area, the fields and the edges
 * only, not on the population, so the last few are kept.
 */
/** The correlation matrix of the slices' cosmic-variance nuisances of a survey with these edges. */
export type CosmicVarianceCorrelationSource = (survey: Survey, edges: readonly number[]) => number[][];

export function cosmicVarianceCorrelation(survey: Survey, edges: readonly number[]): number[][] {
  const key = `${survey.areaSr} ${survey.field.count} ${survey.field.aspect} ${edges.join(',')}`;
  let byKey = correlationCache.get(survey.cosmology);
  if (!byKey) correlationCache.set(survey.cosmology, (byKey = new Map<string, number[][]>()));
  const kept = byKey.get(key);
  if (kept) return kept;
  const cosmo = new FlatCosmology(survey.cosmology);
  const r = slicesCorrelation(uncertaintyContext(survey, cosmo), edges);
  if (byKey.size >= 64) byKey.delete(byKey.keys().next().value!);
  byKey.set(key, r);
  return r;
}
const correlationCache = new WeakMap<object, Map<string, number[][]>>();
