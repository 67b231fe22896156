/**
 * The loader's reading of `detection.photo_z: {sigma, outlier_fraction}` (docs/survey-file.md,
 * "Photometric redshifts"): ranges, the true range it integrates, and slices wide enough to be
 * measured.
 */
import { inputError } from '../errors.js';
import { MAX_REDSHIFT } from '../model/limits.js';
import { PHOTO_Z_MAX_SIGMA, photoZTrueRange, type PhotoZ } from '../model/photo-z.js';
import { fmt } from './zparam.js';

export interface RawPhotoZ {
  sigma?: number;
  outlier_fraction?: number;
}

const KEY = 'detection.photo_z';

/**
 * The photo_z key checked: sigma from 0 to PHOTO_Z_MAX_SIGMA, outlier_fraction from 0 to below 1;
 * the true range (6 sigma beyond the window) below z = MAX_REDSHIFT; every slice at least
 * sigma (1 + z) / 2 wide at its middle (narrower slices are mostly scatter from their neighbours).
 */
export function readPhotoZ(
  raw: RawPhotoZ,
  window: { min: number; max: number },
  edges: readonly number[],
  file: string,
): PhotoZ {
  if (raw.sigma === undefined)
    throw inputError(
      'missing_key',
      file,
      `${KEY}.sigma`,
      'is missing',
      'give the photometric-redshift scatter sigma in units of (1 + z), e.g. 0.03 (0 for exact redshifts)',
    );
  const sigma = raw.sigma;
  if (!(sigma >= 0 && sigma <= PHOTO_Z_MAX_SIGMA)) {
    throw inputError(
      'out_of_range',
      file,
      `${KEY}.sigma`,
      `is ${fmt(sigma)}, outside 0 to ${PHOTO_Z_MAX_SIGMA}`,
      `give sigma in units of (1 + z) from 0 to ${PHOTO_Z_MAX_SIGMA}`,
    );
  }
  const outlierFraction = raw.outlier_fraction ?? 0;
  if (!(outlierFraction >= 0 && outlierFraction < 1)) {
    throw inputError(
      'out_of_range',
      file,
      `${KEY}.outlier_fraction`,
      `is ${fmt(outlierFraction)}, outside 0 to below 1`,
      'give the fraction of catastrophic outliers, from 0 to below 1 (e.g. 0.02)',
    );
  }
  const pz: PhotoZ = { sigma, outlierFraction };
  const range = photoZTrueRange(window, pz);
  if (range.max > MAX_REDSHIFT) {
    throw inputError(
      'out_of_range',
      file,
      `${KEY}.sigma`,
      `makes true redshifts up to z = ${fmt(range.max)} reach the window (6 sigma), beyond z = ${MAX_REDSHIFT}`,
      'give a smaller sigma or a window ending at a lower redshift',
    );
  }
  for (let i = 0; i + 1 < edges.length; i++) {
    const a = edges[i]!;
    const b = edges[i + 1]!;
    const need = (sigma * (1 + 0.5 * (a + b))) / 2;
    if (b - a < need) {
      throw inputError(
        'bad_slices',
        file,
        'slices',
        `the slice ${fmt(a)} to ${fmt(b)} is ${fmt(b - a)} wide in measured redshift, narrower than half the photometric-redshift scatter sigma (1 + z) = ${fmt(2 * need)} there`,
        `give slices at least ${fmt(need)} wide, or a smaller ${KEY}.sigma`,
      );
    }
  }
  return pz;
}

/** The redshifts over which the populations' parameters must make sense: the true range. */
export { photoZTrueRange };
