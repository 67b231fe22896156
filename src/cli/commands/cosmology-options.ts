/** Cosmology flags shared by `distances` and `clustering`: --h0 --omega-m --t-cmb --preset, or --survey FILE. */
import type { Command } from 'commander';
import type { Cosmology } from '../../survey/types.js';
import type { CliIO } from '../io.js';
import { loadSurveyArg, parseNumber } from './common.js';
import { inputError } from '../../errors.js';

export function addCosmologyOptions(cmd: Command): void {
  cmd
    .option('--h0 <km/s/Mpc>', 'Hubble constant (default 70)')
    .option('--omega-m <value>', 'matter density today (default 0.3)')
    .option('--t-cmb <K>', 'CMB temperature; 0 means no radiation (default 0)')
    .option('--preset <name>', 'a published flat parameter set (planck2018, planck2015); flags override it')
    .option('--survey <file>', 'take the cosmology from this survey file');
}

export async function cosmologyFromOptions(opts: Record<string, unknown>, io: CliIO): Promise<Cosmology> {
  const given = ['h0', 'omegaM', 'tCmb', 'preset'].filter((k) => opts[k] !== undefined);
  if (typeof opts.survey === 'string') {
    if (given.length > 0) {
      throw inputError('conflict', '', '--survey', 'cannot be combined with cosmology flags', 'give either --survey or the flags');
    }
    return (await loadSurveyArg(io, opts.survey)).cosmology;
  }
  const { resolveCosmology, PRESETS } = await import('../../cosmology/presets.js');
  const preset = typeof opts.preset === 'string' ? opts.preset : undefined;
  if (preset !== undefined && !(preset in PRESETS)) {
    throw inputError('bad_option', '', '--preset', `unknown preset "${preset}"`, `use one of ${Object.keys(PRESETS).join(', ')}`);
  }
  const num = (k: string, flag: string, range: { min?: number; max?: number; exclusiveMin?: boolean }) =>
    opts[k] === undefined ? undefined : parseNumber(String(opts[k]), flag, range);
  const h0 = num('h0', '--h0', { min: 0, max: 500, exclusiveMin: true }) ?? (preset ? undefined : 70);
  const omegaM = num('omegaM', '--omega-m', { min: 0, max: 1, exclusiveMin: true }) ?? (preset ? undefined : 0.3);
  const tCmb = num('tCmb', '--t-cmb', { min: 0, max: 100 });
  const input: Parameters<typeof resolveCosmology>[0] = {};
  if (preset !== undefined) input.preset = preset;
  if (h0 !== undefined) input.h0 = h0;
  if (omegaM !== undefined) input.omegaM = omegaM;
  if (tCmb !== undefined) input.tCmb = tCmb;
  return resolveCosmology(input);
}
