/**
 * Poisson and cosmic-variance uncertainty of the galaxy count in one redshift slice.
 *
 * Geometry: the survey area areaSr is split into `fieldCount` equal, independent fields of area
 * A = areaSr / fieldCount (sr) with aspect = width / height, so the angular sides are
 * sqrt(A aspect) and sqrt(A / aspect) radians; at the slice's middle redshift the comoving
 * transverse sides are D_M times those (D_M = comoving transverse distance, Hogg 1999 eq. 16),
 * and the radial side is D_C(z2) - D_C(z1). Each field is treated as that rectangular box
 * (the flat-sky box approximation of Newman & Davis 2002, ApJ 564, 567; Trenti & Stiavelli 2008,
 * ApJ 676, 767).
 *
 * Fractions (common practice; Somerville et al. 2004, ApJ 600, L171, eq. 3 for the quadrature sum):
 *   sigma_dm                = rms linear matter fluctuation in one field's box (window.ts)
 *   one field               : cosmic-variance fraction b sigma_dm
 *   `fieldCount` fields     : variance of the total's fraction (b sigma_dm)^2 / fieldCount
 *   cosmicVarianceFraction  = b sigma_dm / sqrt(fieldCount)
 *   poissonFraction         = 1 / sqrt(N)
 *   totalFraction           = sqrt(poisson^2 + cosmicVariance^2)
 * Distances are plain numbers so that this module does not depend on the cosmology code.
 */
import type { LinearPower } from './power-spectrum.js';
import { boxSigma } from './window.js';

export interface SliceGeometry {
  /** Total survey area, steradians. */
  areaSr: number;
  /** Width / height of each field (> 0). */
  aspect: number;
  /** Number of equal, independent fields (integer >= 1). */
  fieldCount: number;
  /** Comoving transverse distance D_M at the slice's middle redshift, Mpc. */
  transverseDistanceMpc: number;
  /** Radial comoving depth D_C(z_max) - D_C(z_min) of the slice, Mpc. */
  radialDepthMpc: number;
  /** Redshift at which the matter fluctuation is evaluated (the slice's middle). */
  zMid: number;
}

export interface SliceUncertaintyInput extends SliceGeometry {
  /** Large-scale galaxy bias (given, or from matchHaloMass). */
  bias: number;
  /** Expected number of galaxies in the slice over the whole area (> 0). */
  count: number;
  /** The matched minimum halo mass, passed through for reporting when the bias came from it. */
  haloMassMinMsun?: number;
}

export interface SliceUncertainty {
  poissonFraction: number;
  cosmicVarianceFraction: number;
  totalFraction: number;
  bias: number;
  /** rms linear matter fluctuation in ONE field's box at zMid. */
  sigmaMatter: number;
  haloMassMinMsun?: number;
}

function positive(v: number, name: string): void {
  if (!(v > 0) || !Number.isFinite(v))
    throw new RangeError(`sliceUncertainty: ${name} must be a positive finite number, got ${v}`);
}

/** Comoving sides [width, height, depth] in Mpc of one field's box. */
export function fieldBoxSidesMpc(g: SliceGeometry): [number, number, number] {
  positive(g.areaSr, 'areaSr');
  positive(g.aspect, 'aspect');
  positive(g.transverseDistanceMpc, 'transverseDistanceMpc');
  positive(g.radialDepthMpc, 'radialDepthMpc');
  if (!(Number.isInteger(g.fieldCount) && g.fieldCount >= 1)) {
    throw new RangeError(`sliceUncertainty: fieldCount must be an integer >= 1, got ${g.fieldCount}`);
  }
  const a = g.areaSr / g.fieldCount;
  const width = Math.sqrt(a * g.aspect) * g.transverseDistanceMpc;
  const height = Math.sqrt(a / g.aspect) * g.transverseDistanceMpc;
  return [width, height, g.radialDepthMpc];
}

/** rms linear matter fluctuation in one field's box of the slice. */
export function sliceMatterSigma(power: LinearPower, g: SliceGeometry): number {
  return boxSigma(power, g.zMid, fieldBoxSidesMpc(g));
}

/**
 * Poisson, cosmic-variance and total fractional uncertainty of a slice's count.
 * Throws a RangeError for a non-positive count (a fraction of zero is undefined) or bias.
 */
export function sliceUncertainty(power: LinearPower, input: SliceUncertaintyInput): SliceUncertainty {
  positive(input.count, 'count');
  positive(input.bias, 'bias');
  const sigmaMatter = sliceMatterSigma(power, input);
  const poissonFraction = 1 / Math.sqrt(input.count);
  const cosmicVarianceFraction = (input.bias * sigmaMatter) / Math.sqrt(input.fieldCount);
  const totalFraction = Math.hypot(poissonFraction, cosmicVarianceFraction);
  const out: SliceUncertainty = {
    poissonFraction,
    cosmicVarianceFraction,
    totalFraction,
    bias: input.bias,
    sigmaMatter,
  };
  if (input.haloMassMinMsun !== undefined) out.haloMassMinMsun = input.haloMassMinMsun;
  return out;
}
