/** Shared test cosmologies for test/uncertainty (the same three as test/reference/generate/power.py). */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { resolveCosmology } from '../../src/cosmology/parameters.js';
import type { Cosmology } from '../../src/model/cosmology.js';

export interface PowerFixtureCosmology {
  name: string;
  h0: number;
  omega_m: number;
  omega_b: number;
  sigma8: number;
  n_s: number;
  t_cmb: number;
}

export interface PowerFixture {
  header: Record<string, unknown>;
  cosmologies: {
    cosmology: PowerFixtureCosmology;
    transfer: { k: number; no_wiggle: number; full: number }[];
    growth: { z: number; d: number }[];
    power: { k: number; z: number; no_wiggle: number; full: number }[];
    sigma_r: { r_mpc: number; z: number; no_wiggle: number; full: number }[];
    sigma_m: { m_msun: number; z: number; r_mpc: number; no_wiggle: number }[];
    rho_m0_msun_mpc3: number;
  }[];
}

export const powerFixture = JSON.parse(
  readFileSync(fileURLToPath(new URL('../reference/power.json', import.meta.url)), 'utf8'),
) as PowerFixture;

export function cosmologyOf(c: PowerFixtureCosmology): Cosmology {
  return resolveCosmology({
    h0: c.h0,
    omegaM: c.omega_m,
    omegaB: c.omega_b,
    sigma8: c.sigma8,
    nS: c.n_s,
    tCmb: c.t_cmb,
  });
}

export const planck2018 = resolveCosmology({ preset: 'planck2018' });

export function relErr(a: number, b: number): number {
  return Math.abs(a / b - 1);
}
