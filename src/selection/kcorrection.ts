/**
 * K-corrections by synthetic photometry (Hogg, Baldry, Blanton & Eisenstein 2002, "The K
 * correction", arXiv:astro-ph/0210394), for detection.sed.
 *
 * Hogg et al. eq. 2: m_R = M_Q + DM(z) + K_QR(z), R the observed band, Q the rest-frame band in which
 * the absolute magnitude is defined; eq. 3: DM = 5 log10(D_L / 10 pc). Eq. 4: the photon-counting AB
 * magnitude through a band R(lambda) is
 *   m_R = -2.5 log10[ int lambda f_lambda R dlambda / int lambda g_lambda R dlambda ],
 * with the AB standard g_nu constant, so int lambda g_lambda R dlambda = c g_nu int R dlambda / lambda.
 * Eq. 8 in its wavelength form, for a rest-frame spectrum L_lambda (any unit: only ratios enter):
 *   K_QR(z) = -2.5 log10[ int l L_lambda(l / (1+z)) R(l) dl * int Q(l) / l dl
 *                         / ( (1+z) int l L_lambda(l) Q(l) dl * int R(l) / l dl ) ].
 * A monochromatic rest frame at lambda_r (Q a delta function; the limit of eq. 8):
 *   K(z) = -2.5 log10[ int l L_lambda(l / (1+z)) R(l) dl / ( (1+z) lambda_r^2 L_lambda(lambda_r) int R(l) / l dl ) ].
 * A source flat in f_nu has K = -2.5 log10(1+z) for every R and Q (eq. 8 with L_lambda ~ lambda^-2).
 *
 * Conventions (test/reference/generate/kcorrection.py): the spectrum is linear in f_lambda between
 * its rows and never extrapolated; a top-hat band is 1 on center +- fwhm/2; a gaussian band is
 * untruncated, integrated over center +- 3 fwhm (outside lies less than 2e-12 of its throughput);
 * a tabulated band is linear between rows and 0 outside. Each integral is a 12-point Gauss-Legendre
 * sum on every interval between the band's nodes (a gaussian's pieces no wider than sigma / 4) and
 * the redshifted spectrum's rows, where the integrand is a cubic (exact to rounding) or smooth.
 * With igm madau1995 the mean intergalactic transmission (src/selection/igm.ts) multiplies the
 * observed-frame integrand, its jumps at lambda_j (1+z) and 912 (1+z) added as nodes.
 *
 * For the counts K(z) is tabulated over each population's window on adaptive piecewise cubics
 * (Lagrange through four equally spaced values, an interval halved until the cubic matches K at
 * three more points to 1e-8 mag) and kept with the survey's spectrum for later calls.
 */
import type { Filter, IgmModel } from '../model/detection.js';
import type { RestFrame, SedPhotometry, Spectrum } from '../model/photometry.js';
import { gaussLegendreRule } from '../numerics/quadrature.js';
import { findInterval } from '../numerics/interpolate.js';
import { bandResponse, bandSupport, checkSpectrumCoverage } from './filter.js';

export { bandResponse, bandSupport, checkSpectrumCoverage };
import { LYMAN_LIMIT_ANGSTROM, MADAU1995_LINES, madau1995Transmission } from './igm.js';

const FWHM_TO_SIGMA = 1 / (2 * Math.sqrt(2 * Math.LN2));
/** Smallest flux ratio a K-correction takes (75 mag): a band that sees no flux keeps K finite. */
const MIN_RATIO = 1e-30;
const GL = gaussLegendreRule(12);

/** A rest-frame f_lambda: its value, the wavelengths where it kinks, and the range it covers. */
export interface SpectrumShape {
  at(angstrom: number): number;
  nodes: ArrayLike<number>;
  min: number;
  max: number;
}

/** A tabulated spectrum, linear between rows. */
export function tabulatedSpectrum(s: Spectrum): SpectrumShape {
  const w = s.wavelengthAngstrom;
  const f = s.fLambda;
  return {
    nodes: w,
    min: w[0]!,
    max: w[w.length - 1]!,
    at(l) {
      const i = findInterval(w, l);
      const t = (l - w[i]!) / (w[i + 1]! - w[i]!);
      return f[i]! + t * (f[i + 1]! - f[i]!);
    },
  };
}

/** The band's own nodes: its ends, a gaussian's pieces of at most sigma / 4, a table's rows. */
function bandNodes(band: Filter): number[] {
  const [lo, hi] = bandSupport(band);
  if (band.profile === 'tophat') return [lo, hi];
  if (band.profile === 'gaussian') {
    const s = band.fwhmAngstrom * FWHM_TO_SIGMA;
    const n = Math.ceil((hi - lo) / (s / 4));
    return Array.from({ length: n + 1 }, (_, i) => (i === n ? hi : lo + ((hi - lo) * i) / n));
  }
  return band.table!.wavelengthAngstrom.filter((l) => l >= lo && l <= hi);
}

/** 12-point Gauss-Legendre on every interval between sorted, distinct edges. */
function sumPanels(f: (l: number) => number, edges: number[]): number {
  let sum = 0;
  for (let k = 0; k + 1 < edges.length; k++) {
    const a = edges[k]!;
    const b = edges[k + 1]!;
    const half = 0.5 * (b - a);
    const mid = 0.5 * (a + b);
    for (let i = 0; i < GL.nodes.length; i++) sum += half * GL.weights[i]! * f(mid + half * GL.nodes[i]!);
  }
  return sum;
}

function mergedEdges(base: number[], extra: number[], lo: number, hi: number): number[] {
  const all = base.concat(extra.filter((x) => x > lo && x < hi));
  all.sort((a, b) => a - b);
  const out: number[] = [];
  for (const x of all) if (out.length === 0 || x > out[out.length - 1]!) out.push(x);
  return out;
}

/**
 * The two integrals of a band at redshift z (observed frame): int l f(l / (1+z)) T(l) R(l) dl and
 * int R(l) / l dl, T the IGM transmission (1 without); the second only `withDen` (else NaN).
 */
export function bandIntegrals(
  spec: SpectrumShape,
  band: Filter,
  z: number,
  igm: IgmModel = 'none',
  withDen = true,
): { num: number; den: number } {
  const [lo, hi] = bandSupport(band);
  const s = 1 + z;
  const extra: number[] = [];
  for (let i = 0; i < spec.nodes.length; i++) extra.push(spec.nodes[i]! * s);
  const jumps = igm === 'madau1995' ? [...MADAU1995_LINES.map(([lj]) => lj * s), LYMAN_LIMIT_ANGSTROM * s] : [];
  const edges = mergedEdges(bandNodes(band), extra.concat(jumps), lo, hi);
  const num = sumPanels(
    igm === 'madau1995'
      ? (l) => l * spec.at(l / s) * madau1995Transmission(l, z) * bandResponse(band, l)
      : (l) => l * spec.at(l / s) * bandResponse(band, l),
    edges,
  );
  const den = withDen ? sumPanels((l) => bandResponse(band, l) / l, edges) : NaN;
  return { num, den };
}

/**
 * K(z) = m - M - DM (Hogg et al. 2002 eq. 2) of a spectrum through a band, the absolute magnitude
 * at a rest wavelength or in a rest band; exact synthetic photometry at each call.
 */
export function kCorrectionFunction(
  spec: SpectrumShape,
  band: Filter,
  rest: RestFrame,
  igm: IgmModel = 'none',
): (z: number) => number {
  const denR = bandIntegrals(spec, band, 0).den;
  let restTerm: number;
  if (rest.kind === 'wavelength') {
    restTerm = rest.angstrom * rest.angstrom * spec.at(rest.angstrom) * denR;
  } else {
    const q = bandIntegrals(spec, rest.band, 0);
    restTerm = (q.num * denR) / q.den;
  }
  return (z) => {
    const { num } = bandIntegrals(spec, band, z, igm, false);
    return -2.5 * Math.log10(Math.max(num / ((1 + z) * restTerm), MIN_RATIO));
  };
}

/** Piecewise cubics through four equally spaced values per interval; intervals halved where needed. */
export function adaptiveCubicTable(
  f: (z: number) => number,
  a: number,
  b: number,
  tol: number,
  maxPiece = 0.05,
): (z: number) => number {
  const starts: number[] = [];
  const values: number[][] = [];
  const MIN_WIDTH = 1e-7;
  const cubicAt = (v: number[], u: number): number => {
    // Lagrange through u = 0, 1/3, 2/3, 1.
    const [y0, y1, y2, y3] = v as [number, number, number, number];
    const t = 3 * u;
    return (
      (-y0 * (t - 1) * (t - 2) * (t - 3)) / 6 +
      (y1 * t * (t - 2) * (t - 3)) / 2 -
      (y2 * t * (t - 1) * (t - 3)) / 2 +
      (y3 * t * (t - 1) * (t - 2)) / 6
    );
  };
  // f1of3, f2of3: f at x0 + h/3 and x0 + 2h/3 when already known (a half's are its parent's h/6, h/3 or 2h/3, 5h/6).
  const build = (x0: number, x1: number, f0: number, f1: number, f1of3?: number, f2of3?: number): void => {
    const h = x1 - x0;
    const v = [f0, f1of3 ?? f(x0 + h / 3), f2of3 ?? f(x0 + (2 * h) / 3), f1];
    const fm = f(x0 + h / 2);
    const f1of6 = f(x0 + h / 6);
    const f5of6 = f(x0 + (5 * h) / 6);
    const ok =
      h < MIN_WIDTH ||
      (Math.abs(cubicAt(v, 0.5) - fm) <= tol &&
        Math.abs(cubicAt(v, 1 / 6) - f1of6) <= tol &&
        Math.abs(cubicAt(v, 5 / 6) - f5of6) <= tol);
    if (ok) {
      starts.push(x0);
      values.push(v);
      return;
    }
    build(x0, x0 + h / 2, f0, fm, f1of6, v[1]);
    build(x0 + h / 2, x1, fm, f1, v[2], f5of6);
  };
  const pieces = Math.max(1, Math.ceil((b - a) / maxPiece));
  let prev = f(a);
  for (let i = 0; i < pieces; i++) {
    const x0 = a + ((b - a) * i) / pieces;
    const x1 = i === pieces - 1 ? b : a + ((b - a) * (i + 1)) / pieces;
    const f1 = f(x1);
    build(x0, x1, prev, f1);
    prev = f1;
  }
  starts.push(b);
  return (z) => {
    if (!(z >= a && z <= b)) return f(z);
    const i = Math.min(findInterval(starts, z), values.length - 1);
    return cubicAt(values[i]!, (z - starts[i]!) / (starts[i + 1]! - starts[i]!));
  };
}

/** Tolerance of the tabulated K(z), mag. */
export const K_TABLE_TOLERANCE = 1e-8;
const cache = new WeakMap<SedPhotometry, Map<string, (z: number) => number>>();

function restKey(rest: RestFrame): string {
  if (rest.kind === 'wavelength') return `w${rest.angstrom}`;
  const b = rest.band;
  return b.profile === 'table' ? `t${b.table!.file}` : `${b.profile}${b.centerAngstrom}/${b.fwhmAngstrom}`;
}

/**
 * K(z) of detection.sed for a rest frame, tabulated over [zMin, zMax] (computed exactly outside it,
 * after checking the spectrum covers the redshift asked for). Kept with the spectrum for later calls.
 */
export function sedKCorrection(
  sed: SedPhotometry,
  rest: RestFrame,
  igm: IgmModel,
  zMin: number,
  zMax: number,
): (z: number) => number {
  let byKey = cache.get(sed);
  if (!byKey) {
    byKey = new Map();
    cache.set(sed, byKey);
  }
  const key = `${restKey(rest)}|${igm}|${zMin}|${zMax}`;
  const hit = byKey.get(key);
  if (hit) return hit;
  checkSpectrumCoverage(sed, rest, zMin, zMax);
  const exact = kCorrectionFunction(tabulatedSpectrum(sed.spectrum), sed.band, rest, igm);
  const guarded = (z: number): number => {
    if (!(z >= zMin && z <= zMax)) checkSpectrumCoverage(sed, rest, z, z);
    return exact(z);
  };
  const table = zMax > zMin ? adaptiveCubicTable(guarded, zMin, zMax, K_TABLE_TOLERANCE) : guarded;
  byKey.set(key, table);
  return table;
}
