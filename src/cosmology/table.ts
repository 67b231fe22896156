/** The rows of the `distances` command (outputs.md, "distances"). */
import type { BackgroundCosmology } from '../model/cosmology.js';
import { FlatCosmology } from './flat-cosmology.js';
import { cosmologyJsonOf, type BackgroundJsonShape } from '../model/cosmology-json.js';
import type { Warning } from '../warnings.js';

export interface DistanceRow {
  z: number;
  comoving_distance_mpc: number;
  luminosity_distance_mpc: number;
  angular_diameter_distance_mpc: number;
  /** Undefined (omitted) where D_L is 0 (z = 0, or a z so small that D_L underflows): -infinity there. */
  distance_modulus?: number;
  volume_element_mpc3_sr: number;
  comoving_volume_gpc3: number;
  lookback_time_gyr: number;
  age_gyr: number;
}

export interface DistanceTable {
  cosmology: BackgroundJsonShape;
  rows: DistanceRow[];
  /** As in every output (src/warnings.ts); none is raised here yet. */
  warnings: Warning[];
}

export function distanceTable(cosmology: BackgroundCosmology, zs: readonly number[]): DistanceTable {
  const c = new FlatCosmology(cosmology);
  return {
    cosmology: cosmologyJsonOf(cosmology),
    rows: zs.map((z) => {
      const row: DistanceRow = {
        z,
        comoving_distance_mpc: c.comovingDistanceMpc(z),
        luminosity_distance_mpc: c.luminosityDistanceMpc(z),
        angular_diameter_distance_mpc: c.angularDiameterDistanceMpc(z),
        volume_element_mpc3_sr: c.volumeElementMpc3Sr(z),
        comoving_volume_gpc3: c.comovingVolumeMpc3(z) / 1e9,
        lookback_time_gyr: c.lookbackTimeGyr(z),
        age_gyr: c.ageGyr(z),
      };
      // at z = 0 (and at redshifts so small that D_L underflows to 0) the modulus is -infinity
      if (row.luminosity_distance_mpc > 0) row.distance_modulus = c.distanceModulus(z);
      return row;
    }),
    warnings: [],
  };
}
