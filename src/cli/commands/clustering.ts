import type { CommandDef } from './types.js';
import { addOutputOptions, outputOptions, parseNumber } from './common.js';
import { addCosmologyOptions, cosmologyFromOptions } from './cosmology-options.js';
import { emit } from '../io.js';
import { inputError } from '../../errors.js';

/** A comma-separated list kept with the text of each item (JSON keys repeat what was typed). */
function parseKeyedList(text: string, option: string, positive: boolean): { key: string; value: number }[] {
  const items = text.split(',').map((s) => s.trim()).filter((s) => s.length > 0);
  if (items.length === 0) throw inputError('bad_option', '', option, 'needs at least one number', `give a comma-separated list, e.g. ${option} 8,20`);
  return items.map((key) => {
    const value = Number(key);
    if (!Number.isFinite(value) || (positive ? value <= 0 : value < 0)) {
      throw inputError('bad_option', '', option, `"${key}" is not a ${positive ? 'positive' : 'non-negative'} number`, 'give a comma-separated list of numbers');
    }
    return { key, value };
  });
}

export const clusteringCommand: CommandDef = {
  name: 'clustering',
  description:
    'linear growth, rms fluctuation in spheres, Sheth-Tormen halo bias and abundance at given redshifts (radii in Mpc and masses in Msun, not h^-1 units)',
  configure(cmd) {
    cmd.requiredOption('--z <list>', 'comma-separated redshifts, e.g. 0,1,3');
    cmd.option('--radius-mpc <list>', 'comoving top-hat radii in Mpc (not h^-1 Mpc), e.g. 8,20', '8');
    cmd.option('--mass-msun <list>', 'halo masses in solar masses (not h^-1 Msun), e.g. 1e11,1e12', '1e12');
    addCosmologyOptions(cmd);
    cmd.option('--omega-b <value>', 'baryon density today (default 0.049)');
    cmd.option('--sigma8 <value>', 'rms linear fluctuation in 8/h Mpc spheres today (default 0.81)');
    cmd.option('--n-s <value>', 'primordial spectral index (default 0.965)');
    cmd.option('--transfer <form>', 'Eisenstein & Hu 1998 transfer function: no_wiggle or full', 'no_wiggle');
    addOutputOptions(cmd);
  },
  async action(cmd, _args, io) {
    const opts = cmd.opts();
    const out = outputOptions(opts);
    const zs = parseKeyedList(String(opts.z), '--z', false);
    const radii = parseKeyedList(String(opts.radiusMpc), '--radius-mpc', true);
    const masses = parseKeyedList(String(opts.massMsun), '--mass-msun', true);
    if (opts.transfer !== 'no_wiggle' && opts.transfer !== 'full') {
      throw inputError('bad_option', '', '--transfer', `unknown form "${opts.transfer}"`, 'use no_wiggle or full');
    }
    if (typeof opts.survey === 'string' && (opts.omegaB !== undefined || opts.sigma8 !== undefined || opts.nS !== undefined)) {
      throw inputError('conflict', '', '--survey', 'cannot be combined with cosmology flags', 'give either --survey or the flags');
    }
    const cosmology = await cosmologyFromOptions(opts, io);
    if (opts.omegaB !== undefined) cosmology.omegaB = parseNumber(String(opts.omegaB), '--omega-b', { min: 0, max: cosmology.omegaM, exclusiveMin: true });
    if (opts.sigma8 !== undefined) cosmology.sigma8 = parseNumber(String(opts.sigma8), '--sigma8', { min: 0, max: 5, exclusiveMin: true });
    if (opts.nS !== undefined) cosmology.nS = parseNumber(String(opts.nS), '--n-s', { min: 0.5, max: 1.5 });
    const { clusteringTable } = await import('../../uncertainty/table.js');
    const result = clusteringTable(cosmology, zs, radii, masses, opts.transfer);
    const { clusteringText, clusteringCsv } = await import('../../render/clustering-table.js');
    emit(io, out, { json: () => result, table: () => clusteringText(result), csv: () => clusteringCsv(result) }, typeof opts.survey === 'string' ? [opts.survey] : []);
    return 0;
  },
};
