/**
 * The cosmological parameters of a survey (flat Lambda-CDM), made and checked once by the
 * cosmology factory (src/cosmology/parameters.ts): every other module trusts them.
 */

/** What the expansion, distances and times depend on. */
export interface BackgroundCosmology {
  /** Name of the preset the values started from, if any (e.g. "planck2018"). */
  preset?: string;
  /** Where the preset's numbers were published. */
  presetSource?: string;
  h0: number; // km/s/Mpc
  omegaM: number; // matter density today
  omegaLambda: number; // 1 - omegaM - omegaR (flat)
  omegaR: number; // photons + 3.046 massless neutrinos; 0 when tCmb = 0
  tCmb: number; // K; 0 = no radiation
}

/** The whole cosmology: the background, and what the growth of structure depends on too. */
export interface Cosmology extends BackgroundCosmology {
  omegaB: number; // baryons (for the transfer function)
  sigma8: number;
  nS: number;
}
