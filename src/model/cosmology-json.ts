/** The cosmology block of every JSON output (specs/*.schema.json, the `cosmology` definition). */
import type { BackgroundCosmology, Cosmology } from './cosmology.js';
import type { CosmologyBlock } from './outputs/shared.js';

/** The block of a cosmology: omega_b, sigma8 and n_s only for a whole cosmology (not a background alone). */
export function cosmologyJsonOf(c: BackgroundCosmology | Cosmology): CosmologyBlock {
  const j: CosmologyBlock = {
    h0: c.h0,
    omega_m: c.omegaM,
    omega_lambda: c.omegaLambda,
    omega_r: c.omegaR,
    t_cmb: c.tCmb,
  };
  if ('omegaB' in c) {
    j.omega_b = c.omegaB;
    j.sigma8 = c.sigma8;
    j.n_s = c.nS;
  }
  if (c.preset) j.preset = c.preset;
  if (c.presetSource) j.preset_source = c.presetSource;
  return j;
}
