/** The rows of the `distances` command (specs/distances.schema.json). */
import type { BackgroundCosmology } from '../model/cosmology.js';
import { FlatCosmology } from './flat-cosmology.js';
import { cosmologyJsonOf } from '../model/cosmology-json.js';
import type { DistanceRow, DistanceTable } from '../model/outputs/distances.js';

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
