/**
 * The forecast's parameters: constant offsets added at every redshift to the population's
 * Schechter parameters (evolving parameters keep their shape).
 *
 *   log10_phi_star   added to log10 phi*(z)
 *   log10_l_star     added to log10 L*(z)     (luminosity variable)
 *   m_star           added to M*(z)           (magnitude variable)
 *   alpha            added to alpha(z)
 *
 * Derivatives of ln lambda at fixed redshift and fixed observed value (so fixed L or M), with
 * u = L/L* (luminosity) or u = 10^(0.4 (M* - M)) (magnitude). In both variables the density per
 * unit ln u is lambda = V phi* u^(alpha+1) exp(-u) c, and with t = ln u:
 *
 *   d ln lambda / d log10_phi_star = ln 10
 *   d ln lambda / d alpha          = ln u
 *   d ln lambda / d log10_l_star   = ln 10 (u - alpha - 1)       (d ln u / d log10 L* = -ln 10)
 *   d ln lambda / d m_star         = 0.4 ln 10 (alpha + 1 - u)   (d ln u / d M* = +0.4 ln 10)
 *
 * i.e. d ln lambda / d characteristic = s (alpha + 1 - u) with s = -ln 10 or +0.4 ln 10: the
 * shift of ln u per unit of the characteristic parameter. Completeness depends on the observed value
 * only, so it drops out of every derivative.
 */
import type { Population } from '../model/population.js';
import type { ParameterOffsets } from '../population/model.js';

export { parameterNames, type ParameterName } from '../model/population.js';

/** Index of each parameter in vectors and matrices: [normalisation, characteristic, alpha]. */
export const PHI = 0;
export const CHAR = 1;
export const ALPHA = 2;

/** d ln u / d(characteristic offset): -ln 10 for log10 L*, +0.4 ln 10 for M*. */
export function characteristicShift(p: Population): number {
  return p.variable === 'luminosity' ? -Math.LN10 : 0.4 * Math.LN10;
}

/** Offsets vector [d log10 phi*, d characteristic, d alpha] as the population model takes them. */
export function offsetsOf(theta: ArrayLike<number>): ParameterOffsets {
  return { log10PhiStar: theta[PHI]!, characteristic: theta[CHAR]!, alpha: theta[ALPHA]! };
}

/** Input value of each parameter at redshift z (log10 phi*, log10 L* or M*, alpha). */
export function parameterValuesAt(p: Population, z: number): [number, number, number] {
  const characteristic = p.variable === 'luminosity' ? Math.log10(p.lStar!.at(z)) : p.mStar!.at(z);
  return [Math.log10(p.phiStar.at(z)), characteristic, p.alpha.at(z)];
}
