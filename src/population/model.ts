/**
 * A population's Schechter parameters evaluated at a redshift, as the count engine uses them:
 * components {phiStar, alpha} sharing one characteristic value (L* for a luminosity variable,
 * M* for a magnitude variable).
 */
import type { Population } from '../model/population.js';
import { ComponentAtZ, type SchechterComponent } from './schechter.js';
import { PC_CM } from '../cosmology/constants.js';
import { AB_ZERO_POINT_JY } from '../model/photometry.js';

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
  const components: ComponentAtZ[] = [];
  for (const c of p.components) components.push(new ComponentAtZ(c.phiStar.at(z) * phiScale, c.alpha.at(z) + dAlpha));
  return { components, characteristic };
}

/**
 * L_nu of M_AB = 0 in erg s^-1 Hz^-1: 4 pi (10 pc)^2 times the AB zero point, 3631 Jy = 3631e-23
 * erg s^-1 cm^-2 Hz^-1 (docs/survey-file.md: M = -2.5 log10(L_nu / (4 pi (10 pc)^2 x 3631 Jy)), the
 * zero point flux-density limits are read with). It was 10^(-0.4 x 48.60) erg s^-1 cm^-2 Hz^-1
 * (Oke & Gunn 1983, 3630.78 Jy) here, so the luminosity densities of magnitude populations were
 * 6.0e-5 below those of the magnitudes every other part of the program uses.
 */
const LNU_AB_ZERO = 4 * Math.PI * (10 * PC_CM) ** 2 * AB_ZERO_POINT_JY * 1e-23;

/**
 * The luminosity that u = 1 stands for, in the unit luminosity densities are given in: L* itself
 * for a luminosity variable (erg/s, or the quantity's unit for threshold surveys); for a magnitude
 * variable L*_nu = 4 pi (10 pc)^2 x 3631 Jy x 10^(-0.4 M*) erg s^-1 Hz^-1 at the rest wavelength.
 */
export function luminosityScale(variable: Population['variable'], characteristic: number): number {
  return variable === 'luminosity' ? characteristic : LNU_AB_ZERO * 10 ** (-0.4 * characteristic);
}
