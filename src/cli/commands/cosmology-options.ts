/** Cosmology flags shared by `distances` and `clustering`: --h0 --omega-m --t-cmb --preset, or --survey FILE. */
import type { Command } from 'commander';
import type { Cosmology } from '../../model/cosmology.js';
import type { InputFile } from '../../model/survey.js';
import type { CliIO } from '../io.js';
import { decimalNumber, loadSurveyArg } from './common.js';
import { excerpt, inputError } from '../../errors.js';
import { COSMOLOGY_KEYS, cosmologyProblem, PRESETS, presetNamed, resolveCosmology, type CosmologyInput } from '../../cosmology/presets.js';

export function addCosmologyOptions(cmd: Command): void {
  cmd
    .option('--h0 <km/s/Mpc>', 'Hubble constant (default 70)')
    .option('--omega-m <value>', 'matter density today (default 0.3)')
    .option('--t-cmb <K>', 'CMB temperature; 0 means no radiation (default 0)')
    .option('--preset <name>', 'a published flat parameter set (planck2018, planck2015); flags override it')
    .option('--survey <file>', 'take the cosmology from this survey file');
}

type FlagKey = 'h0' | 'omegaM' | 'tCmb' | 'omegaB' | 'sigma8' | 'nS';

/**
 * The cosmology of the flags (or of --survey FILE). `extra` names the further flags a command
 * declares (--omega-b, --sigma8, --n-s for `clustering`). Every value must be a decimal number;
 * the ranges are those of a survey file (src/cosmology/presets.ts COSMOLOGY_RANGES), checked by
 * `checkedCosmology`.
 */
export async function cosmologyFromOptions(
  opts: Record<string, unknown>,
  io: CliIO,
  extra: FlagKey[] = [],
  outputs?: { refuseInputs(inputs: readonly InputFile[]): void },
): Promise<Cosmology> {
  const flags: FlagKey[] = ['h0', 'omegaM', 'tCmb', ...extra];
  const given = [...flags, 'preset'].filter((k) => opts[k] !== undefined);
  if (typeof opts.survey === 'string') {
    if (given.length > 0) {
      throw inputError('conflict', '', '--survey', 'cannot be combined with cosmology flags', 'give either --survey or the flags');
    }
    const survey = await loadSurveyArg(io, opts.survey);
    // every file the survey read (its filter tables too) is an input no output may replace
    outputs?.refuseInputs(survey.inputs ?? []);
    return survey.cosmology;
  }
  const preset = typeof opts.preset === 'string' ? opts.preset : undefined;
  if (preset !== undefined && presetNamed(preset) === undefined) {
    throw inputError('bad_option', '', '--preset', `unknown preset "${excerpt(preset)}"`, `use one of ${Object.keys(PRESETS).join(', ')}`);
  }
  const input: CosmologyInput = {};
  if (preset !== undefined) input.preset = preset;
  for (const k of flags) {
    if (opts[k] === undefined) continue;
    const text = String(opts[k]);
    const v = decimalNumber(text);
    const flag = COSMOLOGY_KEYS[k].flag;
    if (v === undefined) throw inputError('bad_option', '', flag, `"${excerpt(text)}" is not a decimal number`, `give ${flag} a number such as ${k === 'h0' ? 70 : k === 'tCmb' ? 2.7255 : 0.3}`);
    input[k] = v;
  }
  if (preset === undefined) {
    input.h0 ??= 70;
    input.omegaM ??= 0.3;
  }
  // distances and times need only h0, omega_m and t_cmb; the power spectrum needs the rest
  return checkedCosmology(resolveCosmology(input), extra.length === 0);
}

/**
 * Refuse (exit 2, naming the flag) a cosmology outside the physical ranges of a survey file
 * (with `distancesOnly`, only h0, omega_m and t_cmb are checked).
 */
export function checkedCosmology(c: Cosmology, distancesOnly = false): Cosmology {
  const problem = cosmologyProblem(c, distancesOnly);
  if (problem) throw inputError('bad_option', '', COSMOLOGY_KEYS[problem.parameter].flag, problem.what, problem.fix);
  return c;
}
