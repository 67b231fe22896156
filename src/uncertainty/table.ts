/** The rows of the `clustering` command: each ingredient of cosmic variance on its own. */
import type { Cosmology } from '../model/cosmology.js';
import { cosmologyJsonOf } from '../model/cosmology-json.js';
import type { ClusteringRow, ClusteringTable } from '../model/outputs/clustering.js';
import { createLinearPower, type TransferForm } from './power-spectrum.js';
import { createHaloModel } from './haloes.js';

export function clusteringTable(
  cosmology: Cosmology,
  zs: readonly { key: string; value: number }[],
  radii: readonly { key: string; value: number }[],
  masses: readonly { key: string; value: number }[],
  form: TransferForm = 'no_wiggle',
): ClusteringTable {
  const power = createLinearPower(cosmology, { form });
  const haloes = createHaloModel(power);
  return {
    cosmology: cosmologyJsonOf(cosmology),
    transfer: form,
    units: { radius: 'comoving Mpc (not h^-1 Mpc)', mass: 'Msun (not h^-1 Msun)', density: 'comoving Mpc^-3' },
    rows: zs.map(({ value: z }) => {
      const row: ClusteringRow = {
        z,
        growth: power.growth(z),
        sigma_r: {},
        halo_bias: {},
        halo_density_above_mpc3: {},
      };
      for (const r of radii) row.sigma_r[r.key] = power.sigmaR(r.value, z);
      for (const m of masses) {
        row.halo_bias[m.key] = haloes.haloBias(m.value, z);
        row.halo_density_above_mpc3[m.key] = haloes.haloDensityAboveMpc3(m.value, z);
      }
      return row;
    }),
    warnings: [],
  };
}
