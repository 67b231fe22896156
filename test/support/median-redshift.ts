import type { Prediction } from '../../src/index.js';

/** The redshift below which half the predicted sources lie (linear within the slice). */
export function medianRedshift(p: Prediction): number {
  const slices = p.slices ?? [];
  const half = p.totals.count / 2;
  let sum = 0;
  for (const s of slices) {
    if (sum + s.count >= half) return s.z_min + ((half - sum) / s.count) * (s.z_max - s.z_min);
    sum += s.count;
  }
  throw new Error('no median');
}
