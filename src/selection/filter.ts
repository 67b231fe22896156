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
import type { RestFrame, SedPhotometry } from '../model/photometry.js';
import { inputError } from '../errors.js';

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
    if (tr[k]! >= 0.5) {
      lo = w[k]!;
      break;
    }
    if (tr[k + 1]! >= 0.5) {
      lo = cross(k);
      break;
    }
  }
  let hi = w[w.length - 1]!;
  for (let k = w.length - 1; k > 0; k--) {
    if (tr[k]! >= 0.5) {
      hi = w[k]!;
      break;
    }
    if (tr[k - 1]! >= 0.5) {
      hi = cross(k - 1);
      break;
    }
  }
  return hi - lo;
}

/*
 * Bands for synthetic photometry (detection.sed, src/selection/kcorrection.ts): unlike a line's
 * filter, a gaussian band is untruncated, integrated over center +- 3 fwhm (outside lies less than
 * 2e-12 of its throughput); a top-hat is 1 on center +- fwhm/2; a table is linear, 0 outside.
 */
/** A gaussian band is integrated over center +- this many fwhm. */
export const GAUSSIAN_BAND_REACH_FWHM = 3;

/** The band's response R(lambda) for synthetic photometry (the gaussian untruncated). */
export function bandResponse(band: Filter, l: number): number {
  if (band.profile === 'table') return tableTransmission(band.table!, l);
  const d = l - band.centerAngstrom;
  if (band.profile === 'tophat') return Math.abs(d) <= band.fwhmAngstrom / 2 ? 1 : 0;
  const s = band.fwhmAngstrom * FWHM_TO_SIGMA;
  return Math.exp(-(d * d) / (2 * s * s));
}

/** [lo, hi] over which a band is integrated. */
export function bandSupport(band: Filter): [number, number] {
  if (band.profile === 'table') return tableRange(band.table!);
  const half = band.profile === 'tophat' ? band.fwhmAngstrom / 2 : GAUSSIAN_BAND_REACH_FWHM * band.fwhmAngstrom;
  return [band.centerAngstrom - half, band.centerAngstrom + half];
}

/** The rest-frame wavelengths [lo, hi] a K-correction at z needs of the spectrum. */
export function restRangeNeeded(sed: SedPhotometry, rest: RestFrame, z: number): [number, number] {
  const [lo, hi] = bandSupport(sed.band);
  let a = lo / (1 + z);
  let b = hi / (1 + z);
  if (rest.kind === 'wavelength') {
    a = Math.min(a, rest.angstrom);
    b = Math.max(b, rest.angstrom);
  } else {
    const [qa, qb] = bandSupport(rest.band);
    a = Math.min(a, qa);
    b = Math.max(b, qb);
  }
  return [a, b];
}

/**
 * Refuse (exit 2, naming detection.sed, or the population's own sed key) a redshift range whose
 * K-correction needs wavelengths the spectrum lacks.
 */
export function checkSpectrumCoverage(sed: SedPhotometry, rest: RestFrame, zMin: number, zMax: number): void {
  const sp = sed.spectrum;
  const min = sp.wavelengthAngstrom[0]!;
  const max = sp.wavelengthAngstrom[sp.wavelengthAngstrom.length - 1]!;
  const [a] = restRangeNeeded(sed, rest, zMax);
  const [, b] = restRangeNeeded(sed, rest, zMin);
  const tol = 1e-12;
  if (a < min * (1 - tol) || b > max * (1 + tol)) {
    const r = (x: number): string => String(Number(x.toPrecision(6)));
    // the rest frame (rest_wavelength or rest_band) does not move with z: no window mends it
    const [qa, qb] = rest.kind === 'wavelength' ? [rest.angstrom, rest.angstrom] : bandSupport(rest.band);
    const restOutside = qa < min * (1 - tol) || qb > max * (1 + tol);
    const restWords =
      rest.kind === 'wavelength'
        ? `the rest wavelength ${r(rest.angstrom)} Angstrom`
        : `the rest band (${r(qa)} to ${r(qb)} Angstrom)`;
    throw inputError(
      'out_of_range',
      sed.surveyFile,
      sed.key ?? 'detection.sed',
      `the spectrum "${sp.file}" covers rest-frame ${r(min)} to ${r(max)} Angstrom, but the band and the rest frame at z = ${r(zMin)} to ${r(zMax)} need ${r(a)} to ${r(b)} Angstrom`,
      restOutside
        ? `give a spectrum covering those wavelengths (${restWords} lies outside it at every redshift, so a narrower redshift range cannot help)`
        : 'give a spectrum covering those wavelengths, or a narrower redshift range',
    );
  }
}
