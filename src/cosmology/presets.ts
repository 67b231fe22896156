/**
 * Published flat cosmological parameter sets. Each records where its numbers come from.
 * Values here were written down from memory of the cited tables; the test
 * test/cosmology/presets.test.ts states that too.
 */
import type { Cosmology } from '../model/cosmology.js';
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

/**
 * The preset of that name, or undefined: only the presets' own names count (never "__proto__",
 * "constructor", "toString" or anything else every JavaScript object carries).
 */
export function presetNamed(name: string): CosmologyPreset | undefined {
  return Object.prototype.hasOwnProperty.call(PRESETS, name) ? PRESETS[name] : undefined;
}

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
  const preset = input.preset !== undefined ? presetNamed(input.preset) : undefined;
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


/**
 * The physical range of each cosmological parameter skytally accepts, checked once when a survey
 * is loaded (and for the cosmology flags of `distances` and `clustering`). Wide enough for any
 * cosmology a survey is planned in, narrow enough that every computation downstream (distances,
 * growth, the Eisenstein & Hu 1998 power spectrum, Sheth-Tormen haloes) stays finite:
 * - h0: 20 to 200 km/s/Mpc (measured values lie near 67-74; common practice);
 * - omega_m: 0.01 to 1 (flat Lambda-CDM with Omega_Lambda >= 0);
 * - omega_b: above 0 and at most half of omega_m (measured: 0.16 of it, Planck 2018; a universe of
 *   mostly baryons is outside what the Eisenstein & Hu 1998 fit describes, and near omega_m it
 *   gives no finite power spectrum);
 * - sigma8: 0.1 to 2 (measured near 0.8; common practice);
 * - n_s: 0.5 to 1.5 (measured near 0.965; common practice);
 * - t_cmb: 0 (no radiation) or 1 to 10 K (measured 2.7255 K, Fixsen 2009), and omega_m plus the
 *   radiation it implies at most 1 (a flat universe with Omega_Lambda >= 0).
 */
export const COSMOLOGY_RANGES = {
  h0: { min: 20, max: 200 },
  omegaM: { min: 0.01, max: 1 },
  sigma8: { min: 0.1, max: 2 },
  nS: { min: 0.5, max: 1.5 },
  tCmb: { min: 1, max: 10 },
} as const;

/** Largest omega_b / omega_m accepted. */
export const MAX_BARYON_FRACTION = 0.5;

/** The survey-file key and command-line flag of each parameter. */
export const COSMOLOGY_KEYS = {
  h0: { key: 'h0', flag: '--h0' },
  omegaM: { key: 'omega_m', flag: '--omega-m' },
  omegaB: { key: 'omega_b', flag: '--omega-b' },
  sigma8: { key: 'sigma8', flag: '--sigma8' },
  nS: { key: 'n_s', flag: '--n-s' },
  tCmb: { key: 't_cmb', flag: '--t-cmb' },
} as const;

export interface CosmologyProblem {
  /** The parameter (a key of COSMOLOGY_KEYS). */
  parameter: keyof typeof COSMOLOGY_KEYS;
  /** What is wrong, e.g. "is 0.3, not below omega_m (0.3)". */
  what: string;
  /** What to give instead. */
  fix: string;
}

function short(v: number): string {
  return Number.isFinite(v) ? String(Number(v.toPrecision(6))) : String(v);
}

/**
 * The first parameter of `c` outside its physical range (COSMOLOGY_RANGES), or undefined. With
 * `distancesOnly`, only what distances and times depend on (h0, omega_m, t_cmb).
 */
export function cosmologyProblem(c: Cosmology, distancesOnly = false): CosmologyProblem | undefined {
  const R = COSMOLOGY_RANGES;
  const inRange = (v: number, r: { min: number; max: number }) => v >= r.min && v <= r.max;
  if (!inRange(c.h0, R.h0)) return { parameter: 'h0', what: `is ${short(c.h0)} km/s/Mpc`, fix: `give a value from ${R.h0.min} to ${R.h0.max} (e.g. 70)` };
  if (!inRange(c.omegaM, R.omegaM)) return { parameter: 'omegaM', what: `is ${short(c.omegaM)}`, fix: `give a value from ${R.omegaM.min} to ${R.omegaM.max} (e.g. 0.3)` };
  if (!(c.tCmb === 0 || inRange(c.tCmb, R.tCmb))) {
    return { parameter: 'tCmb', what: `is ${short(c.tCmb)} K`, fix: `give 0 (no radiation) or a temperature from ${R.tCmb.min} to ${R.tCmb.max} K (measured: 2.7255)` };
  }
  if (!(c.omegaLambda >= 0)) {
    return {
      parameter: 'tCmb',
      what: `is ${short(c.tCmb)} K, whose radiation (omega_r = ${short(c.omegaR)}) with omega_m = ${short(c.omegaM)} exceeds the critical density of a flat universe`,
      fix: 'lower omega_m or t_cmb so that omega_m + omega_r is at most 1',
    };
  }
  if (distancesOnly) return undefined;
  if (!(c.omegaB > 0 && c.omegaB <= MAX_BARYON_FRACTION * c.omegaM)) {
    return {
      parameter: 'omegaB',
      what: `is ${short(c.omegaB)}, not above 0 and at most half of omega_m (${short(c.omegaM)})`,
      fix: 'give the baryon density, a fraction of omega_m (e.g. 0.049 for omega_m = 0.3)',
    };
  }
  if (!inRange(c.sigma8, R.sigma8)) return { parameter: 'sigma8', what: `is ${short(c.sigma8)}`, fix: `give a value from ${R.sigma8.min} to ${R.sigma8.max} (e.g. 0.81)` };
  if (!inRange(c.nS, R.nS)) return { parameter: 'nS', what: `is ${short(c.nS)}`, fix: `give a value from ${R.nS.min} to ${R.nS.max} (e.g. 0.965)` };
  return undefined;
}
