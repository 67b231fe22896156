/* Generated from specs/compare.schema.json by scripts/generate-output-types.ts: do not edit (run `npx tsx scripts/generate-output-types.ts`). */
import type { Warning } from '../../warnings.js';
import type { CosmologyBlock, ModelDescription, RedshiftRange } from './shared.js';

/**
 * Survey files side by side (skytally compare). One entry per file, in the order given. `best` maps a row name (sigma rows as sigma.NAME) to the indices (from 0) of the surveys with the best value: several when their values tie (equal to 1e-9 relative); a row where fewer than two surveys have a value has no entry.
 */
export interface Comparison {
  format: 1;
  cosmic_variance: boolean;
  caveat: string;
  /**
   * @minItems 1
   */
  surveys: ComparedSurvey[];
  best: {
    /**
     * @minItems 1
     */
    [k: string]: number[];
  };
  notes: string[];
  /**
   * What the reader should know although nothing stopped the work (also printed on stderr, one line each); empty when there is nothing to say.
   */
  warnings: Warning[];
}
export interface ComparedSurvey {
  title: string;
  file: string;
  population: string;
  cosmology: CosmologyBlock;
  model: ModelDescription;
  area_deg2: number;
  redshift: RedshiftRange;
  limit: number | string;
  /**
   * Present only when this survey file gave detection.limit as a flux density: the unit it was written in. limit stays an AB magnitude; the human outputs quote it in this unit too (f_nu = 3631 Jy 10^(-0.4 m)).
   */
  limit_unit?: 'Jy' | 'mJy' | 'uJy' | 'nJy' | 'erg/s/cm^2/Hz' | 'W/m^2/Hz';
  /**
   * Present only when this survey file gave detection.limit as a velocity-integrated flux: that value in Jy km/s; limit is its line flux in erg/s/cm^2, and the table's limit row quotes both.
   */
  limit_jy_km_s?: number;
  limit_variable: 'apparent_magnitude' | 'line_flux_cgs' | 'log10_quantity' | 'absolute_magnitude';
  count: number;
  per_deg2: number;
  /**
   * Expected count fainter than L* (or M*).
   */
  faint_count: number;
  poisson_fraction: number;
  cosmic_variance_fraction: number;
  /**
   * With model_uncertainty: the model's fractional 1 sigma of the count, (p84 - p16) / (2 p50) over predict's draws.
   */
  model_fraction?: number;
  sigma: {
    [k: string]: number;
  };
  exposure_hours?: number;
  count_per_hour?: number;
}
