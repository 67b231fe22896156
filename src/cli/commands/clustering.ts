import type { CommandDef } from './types.js';
import { addOutputOptions, optionText, outputOptions, parseKeyedList } from './common.js';
import { addCosmologyOptions, cosmologyFromOptions } from './cosmology-options.js';
import { Outputs, renderText } from '../io.js';
import { inputError } from '../../errors.js';

/**
 * The ranges `clustering` tabulates (common practice; every value inside gives finite results):
 * redshifts 0 to 100, radii 0.001 to 10,000 Mpc, halo masses 1e3 to 1e18 Msun.
 */
export const CLUSTERING_RANGES = {
  z: { min: 0, max: 100 },
  radiusMpc: { min: 1e-3, max: 1e4 },
  massMsun: { min: 1e3, max: 1e18 },
} as const;

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
    const zs = parseKeyedList(String(opts.z), '--z', CLUSTERING_RANGES.z);
    const radii = parseKeyedList(String(opts.radiusMpc), '--radius-mpc', CLUSTERING_RANGES.radiusMpc);
    const masses = parseKeyedList(String(opts.massMsun), '--mass-msun', CLUSTERING_RANGES.massMsun);
    const transfer = opts.transfer as unknown;
    if (transfer !== 'no_wiggle' && transfer !== 'full') {
      throw inputError(
        'bad_option',
        '',
        '--transfer',
        `unknown form "${optionText(transfer)}"`,
        'use no_wiggle or full',
      );
    }
    // --survey with cosmology flags is refused by cosmologyFromOptions (one message for every flag)
    const outputs = new Outputs(io, { out: out.out });
    if (typeof opts.survey === 'string') outputs.refuseInputs([opts.survey]);
    const cosmology = await cosmologyFromOptions(opts, io, outputs);
    const { clusteringTable } = await import('../../uncertainty/table.js');
    const result = clusteringTable(cosmology, zs, radii, masses, transfer);
    const { clusteringText, clusteringCsv } = await import('../../render/clustering-table.js');
    outputs.setMain(
      renderText(out, { json: () => result, table: () => clusteringText(result), csv: () => clusteringCsv(result) }),
    );
    outputs.commit();
    return 0;
  },
};
