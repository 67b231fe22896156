/**
 * The one cosmology factory. Every cosmology skytally computes with is made here, from a survey
 * file's `cosmology:` keys (the loader), the `distances` and `clustering` flags, or a library
 * call (`FlatCosmology.fromParams`): the preset (if named) is applied, the keys given override it,
 * defaults fill the rest, omega_r follows from t_cmb and omega_lambda = 1 - omega_m - omega_r, and
 * every parameter is checked once against its physical range. A value outside it is bad input:
 * one sentence naming the key (or the flag) and the fix, exit status 2. Everything downstream
 * (distances, growth, the power spectrum, haloes) trusts what this returns.
 *
 * The ranges are wide enough for any cosmology a survey is planned in, and narrow enough that
 * every computation stays finite:
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
import { excerpt, inputError, type ErrorCode } from '../errors.js';
import type { BackgroundCosmology, Cosmology } from '../model/cosmology.js';
import { omegaRadiation } from './constants.js';
import { precise } from '../render/format.js';
import { PRESETS, presetNamed } from './presets.js';

/** Defaults for keys a survey file (or the flags) leave out. */
export const COSMOLOGY_DEFAULTS = { tCmb: 0, omegaB: 0.049, sigma8: 0.81, nS: 0.965 } as const;

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
  preset: { key: 'preset', flag: '--preset' },
  h0: { key: 'h0', flag: '--h0' },
  omegaM: { key: 'omega_m', flag: '--omega-m' },
  omegaB: { key: 'omega_b', flag: '--omega-b' },
  sigma8: { key: 'sigma8', flag: '--sigma8' },
  nS: { key: 'n_s', flag: '--n-s' },
  tCmb: { key: 't_cmb', flag: '--t-cmb' },
} as const;

export type CosmologyParameter = keyof typeof COSMOLOGY_KEYS;

/** The parameters as given: a preset's name, the values that override it, nothing else. */
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
 * Where the values were written, for the messages: a survey file's keys (`cosmology.h0`, with the
 * file's path; the default, with no path, for library calls) or the command-line flags (`--h0`).
 */
export type CosmologySource = { kind: 'file'; file: string } | { kind: 'flags' };

const LIBRARY: CosmologySource = { kind: 'file', file: '' };

const short = (v: number): string => precise(v, 6);

function refuse(
  source: CosmologySource,
  parameter: CosmologyParameter,
  code: ErrorCode,
  what: string,
  fix: string,
): never {
  if (source.kind === 'flags') throw inputError('bad_option', '', COSMOLOGY_KEYS[parameter].flag, what, fix);
  throw inputError(code, source.file, `cosmology.${COSMOLOGY_KEYS[parameter].key}`, what, fix);
}

const inRange = (v: number, r: { min: number; max: number }) => v >= r.min && v <= r.max;

/**
 * The background (expansion, distances, times) of `input`: h0, omega_m and t_cmb checked, the
 * power-spectrum parameters neither filled nor checked. Enough for `distances` and for
 * `FlatCosmology`; the growth of structure needs `resolveCosmology`.
 */
export function resolveBackground(input: CosmologyInput, source: CosmologySource = LIBRARY): BackgroundCosmology {
  const names = Object.keys(PRESETS);
  const preset = input.preset !== undefined ? presetNamed(input.preset) : undefined;
  if (input.preset !== undefined && preset === undefined) {
    refuse(
      source,
      'preset',
      'out_of_range',
      `"${excerpt(input.preset)}" is not a known preset`,
      `use one of ${names.join(', ')}, or give h0 and omega_m`,
    );
  }
  const h0 = input.h0 ?? preset?.h0;
  const omegaM = input.omegaM ?? preset?.omegaM;
  for (const [k, v] of [
    ['h0', h0],
    ['omegaM', omegaM],
  ] as const) {
    if (v === undefined)
      refuse(
        source,
        k,
        'missing_key',
        'is missing',
        `give ${COSMOLOGY_KEYS[k].key} or name a preset (${names.join(', ')})`,
      );
  }
  const tCmb = input.tCmb ?? preset?.tCmb ?? COSMOLOGY_DEFAULTS.tCmb;
  const R = COSMOLOGY_RANGES;
  if (!inRange(h0!, R.h0))
    refuse(
      source,
      'h0',
      'out_of_range',
      `is ${short(h0!)} km/s/Mpc`,
      `give a value from ${R.h0.min} to ${R.h0.max} (e.g. 70)`,
    );
  if (!inRange(omegaM!, R.omegaM))
    refuse(
      source,
      'omegaM',
      'out_of_range',
      `is ${short(omegaM!)}`,
      `give a value from ${R.omegaM.min} to ${R.omegaM.max} (e.g. 0.3)`,
    );
  if (!(tCmb === 0 || inRange(tCmb, R.tCmb))) {
    refuse(
      source,
      'tCmb',
      'out_of_range',
      `is ${short(tCmb)} K`,
      `give 0 (no radiation) or a temperature from ${R.tCmb.min} to ${R.tCmb.max} K (measured: 2.7255)`,
    );
  }
  const omegaR = omegaRadiation(h0!, tCmb);
  const omegaLambda = 1 - omegaM! - omegaR;
  if (!(omegaLambda >= 0)) {
    refuse(
      source,
      'tCmb',
      'out_of_range',
      `is ${short(tCmb)} K, whose radiation (omega_r = ${short(omegaR)}) with omega_m = ${short(omegaM!)} exceeds the critical density of a flat universe`,
      'lower omega_m or t_cmb so that omega_m + omega_r is at most 1',
    );
  }
  const c: BackgroundCosmology = { h0: h0!, omegaM: omegaM!, omegaLambda, omegaR, tCmb };
  if (preset) {
    c.preset = preset.name;
    c.presetSource = preset.source;
  }
  return c;
}

/**
 * The whole flat Lambda-CDM cosmology of `input` (background, baryons, sigma8, n_s), every
 * parameter checked. Throws one SurveyError naming the key (`source`) of the first value outside
 * its range.
 */
export function resolveCosmology(input: CosmologyInput, source: CosmologySource = LIBRARY): Cosmology {
  const background = resolveBackground(input, source);
  const preset = input.preset !== undefined ? presetNamed(input.preset) : undefined;
  const omegaB = input.omegaB ?? preset?.omegaB ?? COSMOLOGY_DEFAULTS.omegaB;
  const sigma8 = input.sigma8 ?? preset?.sigma8 ?? COSMOLOGY_DEFAULTS.sigma8;
  const nS = input.nS ?? preset?.nS ?? COSMOLOGY_DEFAULTS.nS;
  const R = COSMOLOGY_RANGES;
  const omegaM = background.omegaM;
  if (!(omegaB > 0 && omegaB <= MAX_BARYON_FRACTION * omegaM)) {
    refuse(
      source,
      'omegaB',
      'out_of_range',
      `is ${short(omegaB)}, not above 0 and at most half of omega_m (${short(omegaM)})`,
      'give the baryon density, a fraction of omega_m (e.g. 0.049 for omega_m = 0.3)',
    );
  }
  if (!inRange(sigma8, R.sigma8))
    refuse(
      source,
      'sigma8',
      'out_of_range',
      `is ${short(sigma8)}`,
      `give a value from ${R.sigma8.min} to ${R.sigma8.max} (e.g. 0.81)`,
    );
  if (!inRange(nS, R.nS))
    refuse(
      source,
      'nS',
      'out_of_range',
      `is ${short(nS)}`,
      `give a value from ${R.nS.min} to ${R.nS.max} (e.g. 0.965)`,
    );
  // The key order of the outputs' cosmology block follows this object's.
  const c: Cosmology = {
    h0: background.h0,
    omegaM,
    omegaLambda: background.omegaLambda,
    omegaR: background.omegaR,
    tCmb: background.tCmb,
    omegaB,
    sigma8,
    nS,
  };
  if (background.preset !== undefined) c.preset = background.preset;
  if (background.presetSource !== undefined) c.presetSource = background.presetSource;
  return c;
}
