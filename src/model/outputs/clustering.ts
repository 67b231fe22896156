/* Generated from specs/clustering.schema.json by scripts/generate-output-types.ts: do not edit (run `npx tsx scripts/generate-output-types.ts`). */
import type { Warning } from '../../warnings.js';
import type { CosmologyBlock } from './shared.js';

/**
 * Radii in comoving Mpc and masses in Msun (no h^-1). Keys of sigma_r, halo_bias and halo_density_above_mpc3 repeat the values as typed on the command line.
 */
export interface ClusteringTable {
  cosmology: CosmologyBlock;
  transfer: 'no_wiggle' | 'full';
  rows: ClusteringRow[];
  /**
   * What the reader should know although nothing stopped the work (also printed on stderr, one line each); empty when there is nothing to say.
   */
  warnings: Warning[];
  units: {
    radius: string;
    mass: string;
    density: string;
  };
}
export interface ClusteringRow {
  z: number;
  /**
   * linear growth D(z), D(0) = 1 (Heath 1977 integral)
   */
  growth: number;
  /**
   * linear rms in a top-hat sphere of that radius at z
   */
  sigma_r: {
    [k: string]: number;
  };
  /**
   * Sheth & Tormen 1999 bias of haloes of that mass
   */
  halo_bias: {
    [k: string]: number;
  };
  /**
   * comoving number density of haloes above that mass
   */
  halo_density_above_mpc3: {
    [k: string]: number;
  };
}
