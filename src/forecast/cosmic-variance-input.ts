/**
 * The one place the forecast gets its per-slice cosmic-variance fractions from.
 *
 * The uncertainty layer (src/uncertainty) is to provide `cosmicVarianceFractions(survey, edges)`:
 * per slice, the fractional rms of the count from large-scale structure (b sigma_dm / sqrt(fields)).
 * It is not there yet (src/uncertainty has the slice physics, `sliceUncertainty`, but not the
 * survey-level function with the population's bias), so this adapter calls
 * `cosmicVarianceNotAvailable`, which throws. The forecast only asks for fractions when cosmic
 * variance is on; `--no-cosmic-variance` never reaches here. When the real function lands, replace
 * the body of `cosmicVarianceInput` with a call to it.
 */
import type { Survey } from '../survey/types.js';

export type CosmicVarianceSource = (survey: Survey, edges: readonly number[]) => number[];

export function cosmicVarianceNotAvailable(): never {
  throw new Error(
    'cosmic variance not available: the per-slice cosmic-variance fractions (src/uncertainty cosmicVarianceFractions) are not in this build yet; run with --no-cosmic-variance for a Poisson-only forecast',
  );
}

/** Per-slice cosmic-variance fractions of `survey` on `edges`. */
export const cosmicVarianceInput: CosmicVarianceSource = (_survey, _edges) => cosmicVarianceNotAvailable();
