/**
 * Mean intergalactic transmission of Madau 1995 (ApJ 441, 18) for a source at redshift z seen at
 * observed wavelength lambda (Angstrom): T = exp(-tau_eff).
 *
 * Line blanketing by the Lyman series (Madau 1995, eq. 12 for Lyman alpha and eq. 15 for the
 * higher lines; equation numbers as cited by independent implementations of the paper): each
 * line j with rest wavelength lambda_j adds
 *     tau_j = A_j (lambda / lambda_j)^3.46   for lambda_j < lambda < lambda_j (1+z),
 * with (lambda_j, A_j) = (1216, 3.6e-3), (1026, 1.7e-3), (973, 1.2e-3), (950, 9.3e-4)
 * (Lyman alpha to delta; Madau's rounded wavelengths). Higher Lyman lines are not included.
 *
 * Photoelectric absorption by Lyman-limit systems, for 912 < lambda < 912 (1+z): the closed-form
 * approximation to Madau 1995's integral (their eq. 16) given in the paper's footnote 3 (from
 * memory; the same four terms appear in independent public implementations), with
 * x_c = lambda / 912 and x_em = 1+z:
 *     tau_pe = 0.25 x_c^3 (x_em^0.46 - x_c^0.46) + 9.4 x_c^1.5 (x_em^0.18 - x_c^0.18)
 *              - 0.7 x_c^3 (x_c^-1.32 - x_em^-1.32) - 0.023 (x_em^1.68 - x_c^1.68).
 * The metal-line term some later codes add is not included.
 *
 * The transmission is floored at 1e-30 (75 mag of dimming): a source behind that counts nothing,
 * and every magnitude stays finite.
 */
import type { Filter, TransmissionTable } from '../model/detection.js';
import { bandResponse, bandSupport, tableRange, tableTransmission } from './filter.js';

export const LYMAN_ALPHA_ANGSTROM = 1216;
export const LYMAN_LIMIT_ANGSTROM = 912;
/** Madau 1995 Lyman-series coefficients: [rest wavelength (Angstrom), A_j]. */
export const MADAU1995_LINES: readonly (readonly [number, number])[] = [
  [1216, 3.6e-3],
  [1026, 1.7e-3],
  [973, 1.2e-3],
  [950, 9.3e-4],
];
export const MIN_IGM_TRANSMISSION = 1e-30;

/** Line-blanketing optical depth (Lyman alpha to delta). */
export function madau1995LineDepth(observedAngstrom: number, z: number): number {
  let tau = 0;
  for (const [lj, aj] of MADAU1995_LINES) {
    if (observedAngstrom > lj && observedAngstrom < lj * (1 + z)) tau += aj * (observedAngstrom / lj) ** 3.46;
  }
  return tau;
}

/** Photoelectric (Lyman-continuum) optical depth, Madau 1995 footnote-3 approximation; 0 redward of 912 (1+z). */
export function madau1995ContinuumDepth(observedAngstrom: number, z: number): number {
  const xc = observedAngstrom / LYMAN_LIMIT_ANGSTROM;
  const xem = 1 + z;
  if (!(xc > 1 && xc < xem)) return 0;
  const tau =
    0.25 * xc ** 3 * (xem ** 0.46 - xc ** 0.46) +
    9.4 * xc ** 1.5 * (xem ** 0.18 - xc ** 0.18) -
    0.7 * xc ** 3 * (xc ** -1.32 - xem ** -1.32) -
    0.023 * (xem ** 1.68 - xc ** 1.68);
  return Math.max(0, tau);
}

/** Mean transmission exp(-(tau_lines + tau_pe)), floored at MIN_IGM_TRANSMISSION. */
export function madau1995Transmission(observedAngstrom: number, z: number): number {
  const t = Math.exp(-(madau1995LineDepth(observedAngstrom, z) + madau1995ContinuumDepth(observedAngstrom, z)));
  return Math.max(t, MIN_IGM_TRANSMISSION);
}

/**
 * Transmission averaged over a tabulated band for a source with f_lambda ~ lambda^beta, counted
 * in photons: <T> = integral T_igm S lambda^(beta+1) dlambda / integral S lambda^(beta+1) dlambda,
 * S the band's curve. Two-point Gauss-Legendre on steps of at most 5 Angstrom (at least 4 per
 * table interval), between nodes at the table's rows and the wavelengths where the IGM
 * transmission jumps (lambda_j (1+z), 912 (1+z)), so the integrand is smooth on every step: within
 * 1e-8 relative of an adaptive quadrature (test/reference/igm_docs.json), where the midpoint rule
 * on 2.5 Angstrom steps it replaced, with as many evaluations, was 3e-5 off at T = 0.003.
 */
const SUB_MIN = 4;
const SUB_STEP_ANGSTROM = 5;
/** Two-point Gauss-Legendre nodes on [0, 1]: 1/2 -+ 1/(2 sqrt 3), each of weight 1/2. */
const GL2_LOW = 0.5 - 0.5 / Math.sqrt(3);
const GL2_HIGH = 0.5 + 0.5 / Math.sqrt(3);
export function bandAveragedMadau1995(band: TransmissionTable, z: number, beta: number): number {
  const w = band.wavelengthAngstrom;
  return averagedMadau1995((l) => tableTransmission(band, l), w[0]!, w[w.length - 1]!, w, z, beta);
}

/**
 * The same average over a band given by its shape, {center, fwhm, profile} (a top-hat, or a
 * gaussian over center +- 3 fwhm as synthetic photometry integrates it; a table as above): the
 * power-law populations of a magnitude survey whose band is a shape because a population gives its
 * own spectrum (sed), so that they see the intergalactic forest across the band as they would
 * through the same curve given as a band_file.
 */
export function bandShapeAveragedMadau1995(band: Filter, z: number, beta: number): number {
  if (band.profile === 'table') return bandAveragedMadau1995(band.table!, z, beta);
  const [lo, hi] = bandSupport(band);
  return averagedMadau1995((l) => bandResponse(band, l), lo, hi, [lo, band.centerAngstrom, hi], z, beta);
}

function averagedMadau1995(
  response: (l: number) => number,
  lo: number,
  hi: number,
  rows: readonly number[],
  z: number,
  beta: number,
): number {
  const nodes = [...rows];
  for (const [lj] of MADAU1995_LINES) nodes.push(lj * (1 + z));
  nodes.push(LYMAN_LIMIT_ANGSTROM * (1 + z));
  const grid = [...new Set(nodes.filter((x) => x >= lo && x <= hi))].sort((a, b) => a - b);
  let num = 0;
  let den = 0;
  for (let k = 0; k + 1 < grid.length; k++) {
    const a = grid[k]!;
    const sub = Math.max(SUB_MIN, Math.ceil((grid[k + 1]! - a) / SUB_STEP_ANGSTROM));
    const h = (grid[k + 1]! - a) / sub;
    for (let s = 0; s < sub; s++) {
      // both nodes inside the step: never evaluated exactly at a jump
      const l1 = a + (s + GL2_LOW) * h;
      const w1 = response(l1) * l1 ** (beta + 1) * h * 0.5;
      const l2 = a + (s + GL2_HIGH) * h;
      const w2 = response(l2) * l2 ** (beta + 1) * h * 0.5;
      den += w1 + w2;
      num += w1 * madau1995Transmission(l1, z) + w2 * madau1995Transmission(l2, z);
    }
  }
  if (!(den > 0)) return 1;
  return Math.max(num / den, MIN_IGM_TRANSMISSION);
}

/** The reddest wavelength the band sees: the table's last wavelength with T > 0, else the effective wavelength. */
export function bandRedEdgeAngstrom(bandAngstrom: number, table?: TransmissionTable): number {
  return table ? tableRange(table)[1] : bandAngstrom;
}
