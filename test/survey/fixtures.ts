/**
 * Valid survey snippets for the loader tests. All are invented demo scenarios; the numbers are
 * plausible but not taken from any survey or paper.
 */
import { stringify } from 'yaml';

/** A narrow-band line search: H-alpha-like line (6563 Angstrom) through a 1.19 um filter. */
export const LINE_YAML = `
format: 1
title: Narrow-band line search in an invented field
cosmology: {h0: 70, omega_m: 0.3}
area: "900 arcmin^2"
detection:
  kind: line_flux
  limit: 5e-17
  line: 6563
  filter: {center: "1.19 um", fwhm: 100}
population:
  variable: luminosity
  phi_star: 1.2e-3
  log10_l_star: "41.9 + 0.2*z"
  alpha: -1.35
slices: {count: 4}
`;

/** A broad-band magnitude-limited count with redshift-dependent parameters. */
export const MAGNITUDE_YAML = `
format: 1
title: Deep broad-band count (demo)
cosmology: {preset: planck2018}
area: 0.5
redshift: {min: 3, max: 5}
detection:
  kind: magnitude
  limit: 27.5
  band: "1.5 um"
  completeness: {model: logistic, half: 27.2, width: 0.15}
population:
  variable: magnitude
  log10_phi_star: {table: [[3, -2.8], [5, -3.4]]}
  m_star: "-20.9 + 0.1*(z - 3)"
  alpha: -1.8
  rest_wavelength: "150 nm"
slices: {width: 0.3}
histogram: {width: 0.5}
exposure: "40 h"
`;

/** A stellar-mass threshold survey with two populations. */
export const THRESHOLD_YAML = `
format: 1
cosmology: {h0: 68, omega_m: 0.31, t_cmb: 2.7255}
area: "0.001 sr"
redshift: {min: 0.5, max: 1.5}
field: {aspect: 2, count: 4}
detection:
  kind: threshold
  limit: {table: [[0.5, 9.5], [1.5, 10.0]]}
populations:
  - name: quiescent
    variable: luminosity
    quantity: stellar mass [Msun]
    phi_star_dex: 2.0e-3
    log10_l_star: 10.9
    alpha: -0.6
    bias: 1.8
  - name: star-forming
    variable: luminosity
    quantity: stellar mass [Msun]
    log10_phi_star_dex: -2.9
    l_star: 8e10
    alpha: -1.3
    occupation: 0.7
slices: {edges: [0.6, 0.8, 1.0, 1.4]}
plan: {budget_hours: 100}
`;

export function clone<T>(x: T): T {
  return structuredClone(x);
}

/** Set (or, with `undefined`, delete) a value at a dotted path like "population.alpha" or "populations[0].name". */
export function setPath(obj: Record<string, unknown>, path: string, value: unknown): Record<string, unknown> {
  const parts = path.replace(/\[(\d+)\]/g, '.$1').split('.');
  let cur: Record<string, unknown> = obj;
  for (const p of parts.slice(0, -1)) {
    if (cur[p] === undefined || cur[p] === null || typeof cur[p] !== 'object') cur[p] = {};
    cur = cur[p] as Record<string, unknown>;
  }
  const last = parts[parts.length - 1]!;
  if (value === undefined) delete cur[last];
  else cur[last] = value;
  return obj;
}

export function toYaml(obj: unknown): string {
  return stringify(obj);
}
