import Table from 'cli-table3';
import type { DistanceRow, DistanceTable } from '../model/outputs/distances.js';
import { cosmologyLine } from './predict-table.js';
import { sig } from './format.js';
import { csvText } from './csv.js';

const COLUMNS: [keyof DistanceRow, string][] = [
  ['z', 'z'],
  ['comoving_distance_mpc', 'D_C [Mpc]'],
  ['luminosity_distance_mpc', 'D_L [Mpc]'],
  ['angular_diameter_distance_mpc', 'D_A [Mpc]'],
  ['distance_modulus', 'distance modulus [mag]'],
  ['volume_element_mpc3_sr', 'dV/dz/dOmega [Mpc^3/sr]'],
  ['comoving_volume_gpc3', 'V(<z) all sky [Gpc^3]'],
  ['lookback_time_gyr', 'lookback [Gyr]'],
  ['age_gyr', 'age [Gyr]'],
];

export function distancesText(t: DistanceTable): string {
  const table = new Table({ head: COLUMNS.map((c) => c[1]), style: { head: [], border: [] } });
  for (const r of t.rows) table.push(COLUMNS.map(([k]) => (r[k] === undefined ? '-' : sig(r[k], 6))));
  return `Cosmology: ${cosmologyLine(t.cosmology)}\n${table.toString()}\n`;
}

export function distancesCsv(t: DistanceTable): string {
  return csvText(
    COLUMNS.map((c) => c[0]),
    t.rows.map((r) => COLUMNS.map(([k]) => (r[k] === undefined ? '' : r[k]))),
  );
}
