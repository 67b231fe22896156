/** Cosmology flags shared by `distances` and `clustering`: --h0 --omega-m --t-cmb --preset, or --survey FILE. */
import type { Command } from 'commander';
import type { BackgroundCosmology, Cosmology } from '../../model/cosmology.js';
import type { InputFile } from '../../model/survey.js';
import type { CliIO } from '../io.js';
import { decimalNumber, loadSurveyArg, optionText } from './common.js';
import { excerpt, inputError } from '../../errors.js';
import {
  COSMOLOGY_KEYS,
  resolveBackground,
  resolveCosmology,
  type CosmologyInput,
} from '../../cosmology/parameters.js';

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
 * The parameters the flags give (or the survey of --survey FILE). `extra` names the further flags
 * a command declares (--omega-b, --sigma8, --n-s for `clustering`). Every value must be a decimal
 * number; without a preset, h0 and omega_m default to 70 and 0.3.
 */
async function cosmologyInput(
  opts: Record<string, unknown>,
  io: CliIO,
  extra: FlagKey[],
  outputs?: { refuseInputs(inputs: readonly InputFile[]): void },
): Promise<{ survey: Cosmology } | { flags: CosmologyInput }> {
  const flags: FlagKey[] = ['h0', 'omegaM', 'tCmb', ...extra];
  const given = [...flags, 'preset'].filter((k) => opts[k] !== undefined);
  if (typeof opts.survey === 'string') {
    if (given.length > 0) {
      throw inputError(
        'conflict',
        '',
        '--survey',
        'cannot be combined with cosmology flags',
        'give either --survey or the flags',
      );
    }
    if (opts.survey === '')
      throw inputError(
        'bad_option',
        '',
        '--survey',
        'is empty',
        'give the path of a survey file, or leave --survey out',
      );
    const survey = await loadSurveyArg(io, opts.survey);
    // every file the survey read (its filter tables too) is an input no output may replace
    outputs?.refuseInputs(survey.inputs ?? []);
    return { survey: survey.cosmology };
  }
  const input: CosmologyInput = {};
  if (typeof opts.preset === 'string') input.preset = opts.preset;
  for (const k of flags) {
    if (opts[k] === undefined) continue;
    const text = optionText(opts[k]);
    const v = decimalNumber(text);
    const flag = COSMOLOGY_KEYS[k].flag;
    if (v === undefined)
      throw inputError(
        'bad_option',
        '',
        flag,
        `"${excerpt(text)}" is not a decimal number`,
        `give ${flag} a number such as ${k === 'h0' ? 70 : k === 'tCmb' ? 2.7255 : 0.3}`,
      );
    input[k] = v;
  }
  if (input.preset === undefined) {
    input.h0 ??= 70;
    input.omegaM ??= 0.3;
  }
  return { flags: input };
}

/** The background cosmology of the flags (h0, omega_m, t_cmb, --preset) or of --survey FILE, for `distances`. */
export async function backgroundFromOptions(
  opts: Record<string, unknown>,
  io: CliIO,
  outputs?: { refuseInputs(inputs: readonly InputFile[]): void },
): Promise<BackgroundCosmology> {
  const given = await cosmologyInput(opts, io, [], outputs);
  return 'survey' in given ? given.survey : resolveBackground(given.flags, { kind: 'flags' });
}

/** The whole cosmology of the flags (with --omega-b, --sigma8, --n-s) or of --survey FILE, for `clustering`. */
export async function cosmologyFromOptions(
  opts: Record<string, unknown>,
  io: CliIO,
  outputs?: { refuseInputs(inputs: readonly InputFile[]): void },
): Promise<Cosmology> {
  const given = await cosmologyInput(opts, io, ['omegaB', 'sigma8', 'nS'], outputs);
  return 'survey' in given ? given.survey : resolveCosmology(given.flags, { kind: 'flags' });
}
