/* Generated from specs/distances.schema.json by scripts/generate-output-types.ts: do not edit (run `npx tsx scripts/generate-output-types.ts`). */
import type { Warning } from '../../warnings.js';
import type { CosmologyBlock } from './shared.js';

export interface DistanceTable {
  cosmology: CosmologyBlock;
  rows: DistanceRow[];
  /**
   * What the reader should know although nothing stopped the work (also printed on stderr, one line each); empty when there is nothing to say.
   */
  warnings: Warning[];
}
export interface DistanceRow {
  z: number;
  comoving_distance_mpc: number;
  luminosity_distance_mpc: number;
  angular_diameter_distance_mpc: number;
  /**
   * absent at z = 0, where it is minus infinity
   */
  distance_modulus?: number;
  /**
   * dV_C/dz/dOmega
   */
  volume_element_mpc3_sr: number;
  /**
   * all-sky comoving volume out to z
   */
  comoving_volume_gpc3: number;
  /**
   * Gyr = 1e9 Julian years
   */
  lookback_time_gyr: number;
  age_gyr: number;
}
