/** The cosmology block of every JSON output (docs/outputs.md). */
import type { BackgroundCosmology, Cosmology } from './cosmology.js';

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

/** The background's block (distances from flags): the parameters of the growth of structure are absent. */
export type BackgroundJsonShape = Omit<CosmologyJsonShape, 'omega_b' | 'sigma8' | 'n_s'> & Partial<Pick<CosmologyJsonShape, 'omega_b' | 'sigma8' | 'n_s'>>;

export function cosmologyJsonOf(c: Cosmology): CosmologyJsonShape;
export function cosmologyJsonOf(c: BackgroundCosmology): BackgroundJsonShape;
export function cosmologyJsonOf(c: BackgroundCosmology & Partial<Cosmology>): BackgroundJsonShape {
  const j: BackgroundJsonShape = { h0: c.h0, omega_m: c.omegaM, omega_lambda: c.omegaLambda, omega_r: c.omegaR, t_cmb: c.tCmb };
  if (c.omegaB !== undefined) j.omega_b = c.omegaB;
  if (c.sigma8 !== undefined) j.sigma8 = c.sigma8;
  if (c.nS !== undefined) j.n_s = c.nS;
  if (c.preset) j.preset = c.preset;
  if (c.presetSource) j.preset_source = c.presetSource;
  return j;
}
