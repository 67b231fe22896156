/**
 * Published flat cosmological parameter sets. Each records where its numbers come from.
 * Values here were written down from memory of the cited tables; the test
 * test/cosmology/presets.test.ts states that too.
 */
import type { Cosmology } from '../survey/types.js';
import { omegaRadiation, T_CMB_DEFAULT_K } from './constants.js';

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
    omegaB: 0.02230 / 0.6774 ** 2,
    sigma8: 0.8159,
    nS: 0.9667,
  },
};

/** Defaults for keys a survey file leaves out (survey-file.md and the uncertainty issue). */
export const COSMOLOGY_DEFAULTS = { tCmb: 0, omegaB: 0.049, sigma8: 0.81, nS: 0.965 } as const;

export interface CosmologyInput {
  preset?: string;
  h0?: number;
  omegaM?: number;
  tCmb?: number;
  omegaB?: number;
  sigma8?: number;
  nS?: number;
}

/**
 * Resolve a flat Lambda-CDM cosmology: start from the preset (if named), apply the keys given,
 * fill defaults, and derive omegaR (from tCmb) and omegaLambda = 1 - omegaM - omegaR.
 * Throws a plain Error naming the missing key when h0 or omegaM is absent without a preset;
 * the survey loader turns that into a SurveyError.
 */
export function resolveCosmology(input: CosmologyInput): Cosmology {
  const preset = input.preset !== undefined ? PRESETS[input.preset] : undefined;
  if (input.preset !== undefined && preset === undefined) {
    throw new Error(`unknown preset ${input.preset}`);
  }
  const h0 = input.h0 ?? preset?.h0;
  const omegaM = input.omegaM ?? preset?.omegaM;
  if (h0 === undefined) throw new Error('h0');
  if (omegaM === undefined) throw new Error('omega_m');
  const tCmb = input.tCmb ?? preset?.tCmb ?? COSMOLOGY_DEFAULTS.tCmb;
  const omegaR = omegaRadiation(h0, tCmb);
  const c: Cosmology = {
    h0,
    omegaM,
    omegaLambda: 1 - omegaM - omegaR,
    omegaR,
    tCmb,
    omegaB: input.omegaB ?? preset?.omegaB ?? COSMOLOGY_DEFAULTS.omegaB,
    sigma8: input.sigma8 ?? preset?.sigma8 ?? COSMOLOGY_DEFAULTS.sigma8,
    nS: input.nS ?? preset?.nS ?? COSMOLOGY_DEFAULTS.nS,
  };
  if (preset) {
    c.preset = preset.name;
    c.presetSource = preset.source;
  }
  return c;
}
