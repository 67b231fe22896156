/**
 * A population's Schechter parameters evaluated at a redshift, as the count engine uses them:
 * components {phiStar, alpha} sharing one characteristic value (L* for a luminosity variable,
 * M* for a magnitude variable).
 */
import type { Population } from '../survey/types.js';
import type { SchechterComponent } from './schechter.js';

/** Constant offsets applied at every z (used by forecasts; evolving parameters keep their shape). */
export interface ParameterOffsets {
  /** Added to log10 phi* (every component). */
  log10PhiStar?: number;
  /** Added to log10 L* (luminosity variable) or to M* (magnitude variable). */
  characteristic?: number;
  /** Added to alpha (every component). */
  alpha?: number;
}

export interface PopulationAtZ {
  components: SchechterComponent[];
  /** L* (erg/s or the quantity's unit) or M* (absolute AB magnitude). */
  characteristic: number;
}

export function populationAt(p: Population, z: number, offsets?: ParameterOffsets): PopulationAtZ {
  const phiScale = offsets?.log10PhiStar ? 10 ** offsets.log10PhiStar : 1;
  const dAlpha = offsets?.alpha ?? 0;
  let characteristic: number;
  if (p.variable === 'luminosity') {
    const l = p.lStar!.at(z);
    characteristic = offsets?.characteristic ? l * 10 ** offsets.characteristic : l;
  } else {
    characteristic = p.mStar!.at(z) + (offsets?.characteristic ?? 0);
  }
  return {
    components: [{ phiStar: p.phiStar.at(z) * phiScale, alpha: p.alpha.at(z) + dAlpha }],
    characteristic,
  };
}
