import Table from 'cli-table3';
import type { ClusteringTable } from '../model/outputs/clustering.js';
import { cosmologyLine } from './predict-table.js';
import { sig } from './format.js';
import { csvText } from './csv.js';

/**
 * The keys of a row's radii or masses in increasing value: an object keeps integer-like keys
 * ("8", "30") ahead of the others ("8.5", "1e12") whatever order they were given in, so that
 * --radius-mpc 30,8.5,8 came out as 8, 30, 8.5 (found by a trial user).
 */
function increasing(block: Record<string, number>): string[] {
  return Object.keys(block).sort((a, b) => Number(a) - Number(b));
}

export function clusteringText(t: ClusteringTable): string {
  const first = t.rows[0]!;
  const rKeys = increasing(first.sigma_r);
  const mKeys = increasing(first.halo_bias);
  const head = [
    'z',
    'growth D',
    ...rKeys.map((r) => `sigma(R=${r} Mpc)`),
    ...mKeys.map((m) => `bias(${m} Msun)`),
    ...mKeys.map((m) => `n(>${m} Msun) [Mpc^-3]`),
  ];
  const table = new Table({ head, style: { head: [], border: [] } });
  for (const row of t.rows) {
    table.push([
      sig(row.z, 4),
      sig(row.growth, 5),
      ...rKeys.map((k) => sig(row.sigma_r[k]!, 4)),
      ...mKeys.map((k) => sig(row.halo_bias[k]!, 4)),
      ...mKeys.map((k) => sig(row.halo_density_above_mpc3[k]!, 4)),
    ]);
  }
  return (
    `Cosmology: ${cosmologyLine(t.cosmology)}, Omega_b = ${sig(t.cosmology.omega_b ?? NaN, 4)}, sigma8 = ${sig(t.cosmology.sigma8 ?? NaN, 4)}, n_s = ${sig(t.cosmology.n_s ?? NaN, 4)}\n` +
    `Linear power: Eisenstein & Hu 1998 (${t.transfer === 'full' ? 'with baryon oscillations' : 'no-wiggle'}) transfer function; haloes: Sheth & Tormen 1999. Radii in Mpc, masses in Msun (no h^-1).\n` +
    `${table.toString()}\n`
  );
}

export function clusteringCsv(t: ClusteringTable): string {
  const first = t.rows[0]!;
  const rKeys = increasing(first.sigma_r);
  const mKeys = increasing(first.halo_bias);
  return csvText(
    [
      'z',
      'growth',
      ...rKeys.map((r) => `sigma_r_${r}`),
      ...mKeys.map((m) => `halo_bias_${m}`),
      ...mKeys.map((m) => `halo_density_above_mpc3_${m}`),
    ],
    t.rows.map((row) => [
      row.z,
      row.growth,
      ...rKeys.map((k) => row.sigma_r[k]!),
      ...mKeys.map((k) => row.halo_bias[k]!),
      ...mKeys.map((k) => row.halo_density_above_mpc3[k]!),
    ]),
  );
}
