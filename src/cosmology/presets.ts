/**
 * Published flat cosmological parameter sets. Each records where its numbers come from.
 * Values here were written down from memory of the cited tables; the test
 * test/cosmology/presets.test.ts states that too.
 */
import { T_CMB_DEFAULT_K } from './constants.js';

export interface CosmologyPreset {
  name: string;
  source: string;
  h0: number;
  omegaM: number;
  tCmb: number;
  omegaB: number;
  sigma8: number;
  nS: number;
}

export const PRESETS: Record<string, CosmologyPreset> = {
  planck2018: {
    name: 'planck2018',
    source:
      'Planck Collaboration 2020, A&A 641, A6 (Planck 2018 VI), Table 2, TT,TE,EE+lowE+lensing+BAO; T_cmb from Fixsen 2009',
    h0: 67.66,
    omegaM: 0.3111,
    tCmb: T_CMB_DEFAULT_K,
    omegaB: 0.02242 / 0.6766 ** 2,
    sigma8: 0.8102,
    nS: 0.9665,
  },
  planck2015: {
    name: 'planck2015',
    source:
      'Planck Collaboration 2016, A&A 594, A13 (Planck 2015 XIII), Table 4, TT,TE,EE+lowP+lensing+ext; T_cmb from Fixsen 2009',
    h0: 67.74,
    omegaM: 0.3089,
    tCmb: T_CMB_DEFAULT_K,
    omegaB: 0.0223 / 0.6774 ** 2,
    sigma8: 0.8159,
    nS: 0.9667,
  },
};

/**
 * The preset of that name, or undefined: only the presets' own names count (never "__proto__",
 * "constructor", "toString" or anything else every JavaScript object carries).
 */
export function presetNamed(name: string): CosmologyPreset | undefined {
  return Object.prototype.hasOwnProperty.call(PRESETS, name) ? PRESETS[name] : undefined;
}
