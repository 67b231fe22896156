/**
 * The one place the forecast gets its per-slice cosmic-variance fractions from: the uncertainty
 * layer (src/uncertainty/prediction.ts), as `predict` computes them for one population: per
 * slice, b sigma_dm / sqrt(field count), with sigma_dm the rms linear matter fluctuation in one
 * field's box at the slice's middle redshift and b the population's bias (given, or "auto" by
 * abundance matching to the slice's count in its volume). The counts are the forecast's own, its
 * density grid's per-slice sums: the same integral as predict's count engine by another
 * quadrature, equal to within about 1e-11 relative, so the fractions are predict's to about that
 * (test/forecast/cosmic-variance-input.test.ts holds them to 1e-9); counting the slices again with
 * the engine only to feed this cost a cold forecast 0.2-0.3 billion instructions. A slice with
 * under 1e-6 expected sources gets 0: its nuisance cannot change the forecast
 * (b_i b_i^T / (N_i + 1/sigma_i^2) vanishes with N_i for any sigma_i), and abundance matching is
 * undefined for so rare a population (the requirement search meets such slices at shallow trial
 * limits).
 * The fractions depend on the area (field sizes) and on the limit (the matched bias), so the
 * requirement search asks again for every trial survey, with the counts of that survey.
 */
import { FlatCosmology } from '../cosmology/flat-cosmology.js';
import type { Population } from '../model/population.js';
import type { Survey } from '../model/survey.js';
import { combinedUncertainty, slicesCorrelation, uncertaintyContext } from '../uncertainty/prediction.js';
import type { Warning } from '../warnings.js';

const NEGLIGIBLE_COUNT = 1e-6;

/**
 * Per-slice cosmic-variance fractions of `population` in `survey` on `edges`, given the expected
 * count of each slice (`counts[i]` in [edges[i], edges[i + 1]], over the survey's whole area); the
 * warnings their computation raises (abundance matching held at a mass bound) are added to
 * `warnings` when given.
 */
export type CosmicVarianceSource = (
  survey: Survey,
  edges: readonly number[],
  population: Population,
  counts: readonly number[],
  warnings?: Warning[],
) => number[];

export const cosmicVarianceInput: CosmicVarianceSource = (survey, edges, population, counts, warnings) => {
  if (counts.length !== edges.length - 1) {
    throw new Error(`cosmic variance: ${counts.length} counts given for ${edges.length - 1} slices`);
  }
  const cosmo = new FlatCosmology(survey.cosmology);
  const ctx = uncertaintyContext(survey, cosmo);
  if (warnings) ctx.warnings = warnings;
  return counts.map((count, i) => {
    if (count < NEGLIGIBLE_COUNT) return 0;
    const zMin = edges[i]!;
    const zMax = edges[i + 1]!;
    // the slice's volume as the count engine gives it (src/counts/engine.ts countPopulation)
    const volumeMpc3 = survey.areaSr * cosmo.comovingVolumeBetweenMpc3Sr(zMin, zMax);
    return (
      combinedUncertainty(ctx, [{ population, count, volumeMpc3 }], zMin, zMax, 0.5 * (zMin + zMax))
        ?.cosmic_variance_fraction ?? 0
    );
  });
};

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
