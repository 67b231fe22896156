/**
 * Per-slice cosmic-variance fractions of one population exactly as `predict` reports them
 * (src/uncertainty/prediction.ts: bias x sigma_matter / sqrt(field count), the bias matched to the
 * slice's number density when it is "auto"), in the form the forecast takes
 * (ForecastOptions.cosmicVarianceSource). A slice with no expected source gets 0 (no nuisance).
 */
import { FlatLambdaCDM } from '../cosmology/flat-lcdm.js';
import type { Population } from '../survey/types.js';
import type { CosmicVarianceSource } from '../forecast/cosmic-variance-input.js';
import { countPopulation } from '../counts/engine.js';
import { combinedUncertainty, uncertaintyContext } from '../uncertainty/prediction.js';

export function predictionCosmicVariance(population: Population): CosmicVarianceSource {
  return (survey, edges) => {
    const cosmo = new FlatLambdaCDM(survey.cosmology);
    const ctx = uncertaintyContext(survey, cosmo);
    const counts = countPopulation(survey, population, cosmo, edges, { noHistogram: true });
    return counts.map((s) => {
      const u = combinedUncertainty(ctx, [{ population, count: s.count, volumeMpc3: s.volumeMpc3 }], s.zMin, s.zMax, 0.5 * (s.zMin + s.zMax));
      return u ? u.cosmic_variance_fraction : 0;
    });
  };
}
