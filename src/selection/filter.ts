/**
 * Transmission curves of filters and bands: the filter profiles, and the maths of tabulated
 * curves (linear between rows, 0 outside; read from their CSV by src/survey/transmission-file.ts).
 *
 * Filter transmission relative to the peak, as a function of observed wavelength.
 * tophat: 1 inside center +- fwhm/2, 0 outside.
 * gaussian: exp(-(lambda-center)^2 / (2 sigma^2)), sigma = fwhm / (2 sqrt(2 ln 2)) (common practice),
 *           cut to 0 outside center +- 1.5 fwhm (docs/survey-file.md, "Filters").
 * table: the tabulated curve, relative to its peak, linear
 *        between rows, 0 outside the table; the window is where it is above 0.
 */
import type { Filter, TransmissionTable } from '../model/detection.js';

export const GAUSSIAN_HALF_RANGE_FWHM = 1.5;
const FWHM_TO_SIGMA = 1 / (2 * Math.sqrt(2 * Math.LN2));

/** Linear interpolation in a transmission table; 0 outside it. */
export function tableTransmission(t: TransmissionTable, observedAngstrom: number): number {
  const w = t.wavelengthAngstrom;
  const n = w.length;
  if (!(observedAngstrom >= w[0]! && observedAngstrom <= w[n - 1]!)) return 0;
  let lo = 0;
  let hi = n - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (w[mid]! <= observedAngstrom) lo = mid;
    else hi = mid;
  }
  const a = t.transmission[lo]!;
  const b = t.transmission[hi]!;
  return a + ((observedAngstrom - w[lo]!) / (w[hi]! - w[lo]!)) * (b - a);
}

export function transmission(filter: Filter, observedAngstrom: number): number {
  if (filter.profile === 'table') return tableTransmission(filter.table!, observedAngstrom);
  const d = observedAngstrom - filter.centerAngstrom;
  if (filter.profile === 'tophat') return Math.abs(d) <= filter.fwhmAngstrom / 2 ? 1 : 0;
  if (Math.abs(d) > GAUSSIAN_HALF_RANGE_FWHM * filter.fwhmAngstrom) return 0;
  const sigma = filter.fwhmAngstrom * FWHM_TO_SIGMA;
  return Math.exp(-(d * d) / (2 * sigma * sigma));
}

/** Observed-wavelength range [lo, hi] (Angstrom) over which a line can be counted. */
export function filterRangeAngstrom(filter: Filter): [number, number] {
  if (filter.profile === 'table') return tableRange(filter.table!);
  const half = filter.profile === 'tophat' ? filter.fwhmAngstrom / 2 : GAUSSIAN_HALF_RANGE_FWHM * filter.fwhmAngstrom;
  return [filter.centerAngstrom - half, filter.centerAngstrom + half];
}

/** Redshift range over which a line of rest wavelength `lineAngstrom` falls in the filter. */
export function filterRedshiftWindow(filter: Filter, lineAngstrom: number): { min: number; max: number } {
  const [lo, hi] = filterRangeAngstrom(filter);
  return { min: lo / lineAngstrom - 1, max: hi / lineAngstrom - 1 };
}

/** [lo, hi]: the wavelength range where the curve is above 0 (linear between rows, 0 outside). */
export function tableRange(t: TransmissionTable): [number, number] {
  const w = t.wavelengthAngstrom;
  const tr = t.transmission;
  let i = tr.findIndex((x) => x > 0);
  let j = tr.length - 1 - [...tr].reverse().findIndex((x) => x > 0);
  if (i > 0) i -= 1;
  if (j < tr.length - 1) j += 1;
  return [w[i]!, w[j]!];
}

/** Transmission-weighted mean wavelength, integral lambda T / integral T (trapezoids, exact for linear T). */
export function tableMeanWavelength(t: TransmissionTable): number {
  const w = t.wavelengthAngstrom;
  const tr = t.transmission;
  let num = 0;
  let den = 0;
  for (let k = 0; k + 1 < w.length; k++) {
    const h = w[k + 1]! - w[k]!;
    const a = tr[k]!;
    const b = tr[k + 1]!;
    den += (h * (a + b)) / 2;
    // integral of lambda T over a linear piece: h/6 (2 w0 a + w0 b + w1 a + 2 w1 b)
    num += (h / 6) * (2 * w[k]! * a + w[k]! * b + w[k + 1]! * a + 2 * w[k + 1]! * b);
  }
  return num / den;
}

/** Distance between the outermost wavelengths where the curve crosses half its peak. */
export function tableFwhm(t: TransmissionTable): number {
  const w = t.wavelengthAngstrom;
  const tr = t.transmission;
  const cross = (k: number): number => {
    const a = tr[k]!;
    const b = tr[k + 1]!;
    return w[k]! + ((0.5 - a) / (b - a)) * (w[k + 1]! - w[k]!);
  };
  let lo = w[0]!;
  for (let k = 0; k + 1 < w.length; k++) {
    if (tr[k]! >= 0.5) { lo = w[k]!; break; }
    if (tr[k + 1]! >= 0.5) { lo = cross(k); break; }
  }
  let hi = w[w.length - 1]!;
  for (let k = w.length - 1; k > 0; k--) {
    if (tr[k]! >= 0.5) { hi = w[k]!; break; }
    if (tr[k - 1]! >= 0.5) { hi = cross(k - 1); break; }
  }
  return hi - lo;
}
