/**
 * The assumed luminosity function at one redshift, tabulated for plotting.
 *
 * For a luminosity variable the curve is the number density per dex,
 *   phi(log10 L) = ln10 sum_c phi*_c (L/L*)^(alpha_c+1) exp(-L/L*)   [Mpc^-3 dex^-1],
 * and for a magnitude variable the density per magnitude,
 *   phi(M) = 0.4 ln10 sum_c phi*_c 10^(0.4 (alpha_c+1) (M*-M)) exp(-10^(0.4 (M*-M)))   [Mpc^-3 mag^-1]
 * (schechterPerDex and schechterMagnitude in schechter.ts; Schechter 1976, ApJ 203, 297), with
 * the parameters the count engine uses at that redshift (populationAt in model.ts).
 *
 * The grid runs from well above the knee (where the exponential has cut the density by many
 * decades) down past the limit, so that the detected part and the knee can both be drawn.
 */
import type { Population } from '../model/population.js';
import type { ModelOffsets } from '../model/model-uncertainty.js';
import { populationAt } from './model.js';
import { schechterMagnitude, schechterPerDex } from './schechter.js';

/** One curve, in the shape the figure layer draws (src/render/types.ts LuminosityFunctionCurve). */
export interface LuminosityFunctionCurve {
  /** log10 L (erg/s, or log10 of the quantity) or absolute AB magnitude M; ascending. */
  x: number[];
  /** Number density per unit of x: Mpc^-3 dex^-1 (luminosity) or Mpc^-3 mag^-1 (magnitude). */
  phi: number[];
  /** The limit at this redshift, in x; null where nothing is detected there (a narrow-band filter passing none of the lines). */
  limit: number | null;
  /** log10 L* or M* at this redshift. */
  knee: number;
  /** Axis label with units. */
  x_label: string;
  /** Under the model's own uncertainty: the 16th and 84th percentiles of phi at each x over its draws. */
  band?: LuminosityFunctionBand;
}

/** The spread of a luminosity function over the model's draws, at the curve's x. */
export interface LuminosityFunctionBand {
  draws: number;
  p16: number[];
  p84: number[];
}

export interface CurveOptions {
  /** Grid step in x: dex for luminosity, mag for magnitude (default 0.02 dex, 0.05 mag). */
  step?: number;
  /** Axis label; default from the variable (and the quantity, when given). */
  xLabel?: string;
}

/** Dex above the knee the curve reaches (u = L/L* = 10^1.2 ~ 16: exp(-u) ~ 1e-7). */
export const DEX_ABOVE_KNEE = 1.2;
/** Dex below the knee the curve reaches at least. */
export const DEX_BELOW_KNEE = 3;
/** Dex the curve runs past the limit on its faint side. */
export const DEX_PAST_LIMIT = 0.5;
/** The faint end never runs further than this below the knee (a limit far fainter is off the plot). */
export const MAX_DEX_BELOW_KNEE = 8;

/** Default axis label for a population's variable. */
export function curveAxisLabel(p: Population, threshold: boolean): string {
  if (p.variable === 'magnitude') return 'absolute AB magnitude M [mag]';
  if (threshold) {
    const q = p.quantity?.trim();
    return q ? `log₁₀ ${q}` : 'log₁₀ quantity';
  }
  return 'log₁₀ L [erg s⁻¹]';
}

/**
 * The luminosity function of `p` at redshift `z`, with the limit `limit` (log10 L, or M) marked;
 * without a limit (null: nothing is detected at `z`) the curve spans its usual range below the knee.
 * Throws when the population's parameters are not finite there (the loader checks the window,
 * so this happens only for z outside it).
 */
export function luminosityFunctionCurve(
  p: Population,
  z: number,
  limit: number | null,
  options: CurveOptions = {},
): LuminosityFunctionCurve {
  const at = populationAt(p, z);
  const magnitude = p.variable === 'magnitude';
  const knee = magnitude ? at.characteristic : Math.log10(at.characteristic);
  if (!Number.isFinite(knee) || (limit !== null && !Number.isFinite(limit))) {
    throw new Error(`luminosity function at z = ${z}: the knee or the limit is not a finite number`);
  }
  // Work in dex of luminosity: d = log10(L/L*); for magnitudes d = 0.4 (M* - M).
  const limitDex = limit === null ? 0 : magnitude ? 0.4 * (knee - limit) : limit - knee;
  const faintDex = Math.max(-MAX_DEX_BELOW_KNEE, Math.min(-DEX_BELOW_KNEE, limitDex - DEX_PAST_LIMIT));
  const brightDex = DEX_ABOVE_KNEE;
  const step = options.step ?? (magnitude ? 0.125 : 0.05);
  if (!(step > 0)) throw new Error('luminosity function: the grid step must be positive');
  // x from the low end to the high end of the range, ascending.
  const lo = magnitude ? knee - 2.5 * brightDex : knee + faintDex;
  const hi = magnitude ? knee - 2.5 * faintDex : knee + brightDex;
  // (the 1e-9 keeps a range that is a whole number of steps from ending in a repeated point)
  const n = Math.max(2, Math.ceil((hi - lo) / step - 1e-9) + 1);
  const x: number[] = [];
  const phi: number[] = [];
  for (let i = 0; i < n; i++) {
    const xi = i === n - 1 ? hi : lo + i * step;
    let v = 0;
    for (const c of at.components) {
      v += magnitude ? schechterMagnitude(xi, c.phiStar, knee, c.alpha) : schechterPerDex(xi, c.phiStar, knee, c.alpha);
    }
    if (!Number.isFinite(v)) throw new Error(`luminosity function at z = ${z}: phi is not finite at x = ${xi}`);
    x.push(xi);
    phi.push(v);
  }
  return { x, phi, limit, knee, x_label: options.xLabel ?? curveAxisLabel(p, false) };
}

/**
 * values[i * n + d]: phi at x[i] under draw d. Each term is schechterMagnitude's (or
 * schechterPerDex's) own arithmetic in its own order, with the factor in front of u^(alpha+1)
 * (0.4 ln10 phi*, or ln10 phi*) and alpha + 1 made once per draw and component: the same numbers,
 * bit for bit, at a fraction of the cost (a report draws some 10^6 of them). Its loop and the
 * percentiles' are functions of their own: in one function, V8 compiled the first loop while it
 * ran, and the second, reached without type feedback, threw that code away.
 */
function bandValues(
  components: readonly { phiStar: number; alpha: number }[],
  knee: number,
  magnitude: boolean,
  x: readonly number[],
  offsets: readonly ModelOffsets[],
  values: Float64Array,
): void {
  const n = offsets.length;
  const nx = x.length;
  const nc = components.length;
  const front = new Float64Array(nc);
  const power = new Float64Array(nc);
  const scale = magnitude ? 0.4 * Math.LN10 : Math.LN10;
  for (let d = 0; d < n; d++) {
    const o = offsets[d]!;
    const k = knee + o.characteristic;
    for (let j = 0; j < nc; j++) {
      const c = components[j]!;
      front[j] = scale * (c.phiStar * 10 ** (o.log10PhiStar[j] ?? 0));
      power[j] = c.alpha + (o.alpha[j] ?? 0) + 1;
    }
    for (let i = 0; i < nx; i++) {
      const e = magnitude ? 0.4 * (k - x[i]!) : x[i]! - k;
      const u = 10 ** e;
      const tail = Math.exp(-u);
      let v = 0;
      for (let j = 0; j < nc; j++) v += front[j]! * u ** power[j]! * tail;
      values[i * n + d] = v;
    }
  }
}

/** The 16th and 84th percentiles of each x's n draws in values (sorted in place). */
function bandPercentiles(values: Float64Array, nx: number, n: number): { p16: number[]; p84: number[] } {
  const p16: number[] = [];
  const p84: number[] = [];
  for (let i = 0; i < nx; i++) {
    const v = values.subarray(i * n, (i + 1) * n).sort();
    p16.push(percentileOf(v, 0.16));
    p84.push(percentileOf(v, 0.84));
  }
  return { p16, p84 };
}

/** Linear interpolation between the order statistics of a sorted array. */
function percentileOf(sorted: Float64Array, q: number): number {
  const h = (sorted.length - 1) * q;
  const lo = Math.floor(h);
  const hi = Math.min(lo + 1, sorted.length - 1);
  return sorted[lo]! + (h - lo) * (sorted[hi]! - sorted[lo]!);
}

/**
 * The luminosity function of `p` at redshift `z` under each draw of its own uncertainty (the
 * offsets predict's draws use: src/counts/model-draws.ts drawModelOffsets), at the points `x`:
 * per x the 16th and 84th percentiles of phi over the draws (linear between order statistics,
 * Hyndman & Fan 1996 type 7, numpy's default). Each draw moves phi*_c by 10^(d_phi_c), alpha_c by
 * d_alpha_c and log10 L* (or M*) by d_c, at every redshift alike (docs/survey-file.md).
 */
export function luminosityFunctionBand(
  p: Population,
  z: number,
  x: readonly number[],
  offsets: readonly ModelOffsets[],
): LuminosityFunctionBand {
  const at = populationAt(p, z);
  const magnitude = p.variable === 'magnitude';
  const knee = magnitude ? at.characteristic : Math.log10(at.characteristic);
  const n = offsets.length;
  const nx = x.length;
  const values = new Float64Array(nx * n);
  bandValues(at.components, knee, magnitude, x, offsets, values);
  const { p16, p84 } = bandPercentiles(values, nx, n);
  return { draws: n, p16, p84 };
}
