/** The cosmology block of every JSON output (outputs.md). */
import type { Cosmology } from './cosmology.js';

export interface CosmologyJsonShape {
  h0: number;
  omega_m: number;
  omega_lambda: number;
  omega_r: number;
  t_cmb: number;
  omega_b: number;
  sigma8: number;
  n_s: number;
  preset?: string;
  preset_source?: string;
}

export function cosmologyJsonOf(c: Cosmology): CosmologyJsonShape {
  const j: CosmologyJsonShape = {
    h0: c.h0,
    omega_m: c.omegaM,
    omega_lambda: c.omegaLambda,
    omega_r: c.omegaR,
    t_cmb: c.tCmb,
    omega_b: c.omegaB,
    sigma8: c.sigma8,
    n_s: c.nS,
  };
  if (c.preset) j.preset = c.preset;
  if (c.presetSource) j.preset_source = c.presetSource;
  return j;
}
