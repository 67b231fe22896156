/**
 * The three sources of a count's uncertainty (Poisson noise, cosmic variance and the assumed
 * model's own uncertainty) side by side, for the text table's footer and the report's sentences.
 */
import type { ModelSpread } from '../model/outputs/prediction.js';

/**
 * The three sources of a count's uncertainty as fractions of the count (Poisson, cosmic variance,
 * the model's (p84 - p16) / (2 p50)) and the one that dominates; undefined without the model block.
 */
export function uncertaintySources(
  u: { poisson_fraction: number; cosmic_variance_fraction: number } | undefined,
  m: ModelSpread | undefined,
):
  | {
      poisson: number;
      cosmicVariance: number;
      model: number;
      dominant: 'Poisson noise' | 'cosmic variance' | 'the model';
    }
  | undefined {
  if (!u || !m) return undefined;
  const parts = [
    ['Poisson noise', u.poisson_fraction],
    ['cosmic variance', u.cosmic_variance_fraction],
    ['the model', m.fraction],
  ] as const;
  const dominant = parts.reduce((a, b) => (b[1] > a[1] ? b : a))[0];
  return { poisson: u.poisson_fraction, cosmicVariance: u.cosmic_variance_fraction, model: m.fraction, dominant };
}
