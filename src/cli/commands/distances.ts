import type { CommandDef } from './types.js';
import { addOutputOptions, outputOptions, parseNumberList } from './common.js';
import { addCosmologyOptions, backgroundFromOptions } from './cosmology-options.js';
import { Outputs, renderText } from '../io.js';

/** Highest redshift `distances` tabulates (far beyond the last scattering surface at z ~ 1100). */
export const MAX_DISTANCE_Z = 10_000;

export const distancesCommand: CommandDef = {
  name: 'distances',
  description: 'distances, volumes and times at the given redshifts (flat Lambda-CDM)',
  configure(cmd) {
    cmd.requiredOption('--z <list>', 'comma-separated redshifts, e.g. 0.5,1,2');
    addCosmologyOptions(cmd);
    addOutputOptions(cmd);
  },
  async action(cmd, _args, io) {
    const opts = cmd.opts();
    const out = outputOptions(opts);
    const zs = parseNumberList(String(opts.z), '--z', { min: 0, max: MAX_DISTANCE_Z });
    const outputs = new Outputs(io, { out: out.out });
    if (typeof opts.survey === 'string') outputs.refuseInputs([opts.survey]);
    const cosmology = await backgroundFromOptions(opts, io, outputs);
    const { distanceTable } = await import('../../cosmology/table.js');
    const result = distanceTable(cosmology, zs);
    const { distancesText, distancesCsv } = await import('../../render/distances-table.js');
    outputs.setMain(
      renderText(out, { json: () => result, table: () => distancesText(result), csv: () => distancesCsv(result) }),
    );
    outputs.commit();
    return 0;
  },
};
