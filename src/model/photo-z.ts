/**
 * Photometric redshifts (docs/survey-file.md, "Photometric redshifts"): a source at true redshift z
 * is measured at z + N(0, sigma (1 + z)), or, with probability outlierFraction, anywhere in the
 * survey's redshift window with equal probability. Slices are then slices in measured redshift.
 */

export interface PhotoZ {
  /** sigma of the measured redshift in units of (1 + z); 0 for exact redshifts. */
  sigma: number;
  /** Probability (0 to 1, below 1) that a source is an outlier, measured uniformly over the window. */
  outlierFraction: number;
}

/**
 * How far beyond the window true redshifts are integrated, in sigma: a source 6 sigma away from an
 * edge reaches it with probability below 1e-9 (the gaussian tail beyond 6 sigma is 9.9e-10).
 */
export const PHOTO_Z_REACH_SIGMA = 6;

/** Largest sigma accepted: the true range (zmax + 6 sigma) / (1 - 6 sigma) stays finite and the slices measurable. */
export const PHOTO_Z_MAX_SIGMA = 0.15;

/**
 * The true redshifts integrated for a window [zmin, zmax]: every z from which a source reaches an
 * edge within PHOTO_Z_REACH_SIGMA standard deviations, z +- r sigma (1 + z) = edge:
 * [max(0, (zmin - r sigma) / (1 + r sigma)), (zmax + r sigma) / (1 - r sigma)]. The window itself when sigma is 0.
 */
export function photoZTrueRange(window: { min: number; max: number }, pz: PhotoZ): { min: number; max: number } {
  if (!(pz.sigma > 0)) return { min: window.min, max: window.max };
  const rs = PHOTO_Z_REACH_SIGMA * pz.sigma;
  return { min: Math.max(0, (window.min - rs) / (1 + rs)), max: (window.max + rs) / (1 - rs) };
}

/** True when photometric redshifts change nothing: sigma 0 and no outliers. */
export function photoZIsExact(pz: PhotoZ | undefined): boolean {
  return pz === undefined || (pz.sigma === 0 && pz.outlierFraction === 0);
}
