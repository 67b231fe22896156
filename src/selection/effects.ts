/**
 * Selection effects as functions of redshift (docs/survey-file.md, "Selection effects"):
 *
 *  - redshift selection S(z): the fraction of sources at true z that the selection keeps (the
 *    population's own, or else the detection's); it multiplies the density of detected sources;
 *  - line blending b: a line survey measures F = L T (1 + b) 10^(-0.4 A) / (4 pi D_L^2), so the
 *    observed value obs = log10 F moves by log10(1 + b); the luminosity function stays unblended.
 *    With blended lines each at its own wavelength lambda_i and ratio r_i, the measured flux is
 *    F = L (T(lambda_0 (1 + z)) + sum_i r_i T(lambda_i (1 + z))) 10^(-0.4 A) / (4 pi D_L^2): the
 *    observer takes the sum as its transmission (lineTransmission), so that a source is found by its
 *    blended flux even where the line itself has left the filter;
 *  - attenuation A(z) (mag): the luminosity function is intrinsic; a line flux is dimmed by
 *    10^(-0.4 A) (obs moves by -0.4 A), an apparent magnitude grows by A (grey over the band);
 *  - equivalent-width cut: the kept fraction E(z) = P(W_line > W_cut / B(z)) (rest frame) or
 *    P(W_line > W_cut / ((1 + z) B(z))) (observed frame), taken as independent of luminosity:
 *    the cut applies to the measured width, which holds the blended lines (B = 1 + b; with blended
 *    lines at their own wavelengths the blend at z, (T_0 + sum_i r_i T_i) / T_0 where the line is
 *    in the filter and sum_i r_i T_i where it is not), and dust dims line and continuum alike.
 *
 * The density of detected sources at z is then S(z) E(z) times the plain one evaluated with obs
 * shifted by obsShift(z). With S = 1, b = 0, A = 0 and a cut of 0 everything is exactly as without.
 */
import type { Detection } from '../model/detection.js';
import type { Population } from '../model/population.js';
import type { BlendedLine, EquivalentWidthDistribution } from '../model/selection.js';
import type { ZParam } from '../model/zparam.js';
import { upperGamma } from '../numerics/gamma.js';
import { bisectCrossing } from '../numerics/roots.js';
import { filterRangeAngstrom, transmission } from './filter.js';

const SQRT_PI = Math.sqrt(Math.PI);

/** The complementary error function: erfc(x) = Gamma(1/2, x^2) / sqrt(pi) for x >= 0, 2 - erfc(-x) below. */
export function erfc(x: number): number {
  if (x >= 0) return upperGamma(0.5, x * x) / SQRT_PI;
  return 2 - upperGamma(0.5, x * x) / SQRT_PI;
}

/** P(W > w) of a rest-frame equivalent-width distribution (w in Angstrom); 1 at w <= 0. */
export function fractionAbove(d: EquivalentWidthDistribution, w: number): number {
  switch (d.model) {
    case 'exponential':
      return w <= 0 ? 1 : Math.exp(-w / d.scaleAngstrom);
    case 'lognormal':
      return w <= 0 ? 1 : 0.5 * erfc((Math.log10(w) - Math.log10(d.medianAngstrom)) / (d.sigmaDex * Math.SQRT2));
    case 'table': {
      const xs = d.widthAngstrom;
      const ys = d.fractionAbove;
      if (w <= xs[0]!) return w <= 0 ? 1 : ys[0]!;
      const n = xs.length;
      if (w >= xs[n - 1]!) return ys[n - 1]!;
      let lo = 0;
      let hi = n - 1;
      while (hi - lo > 1) {
        const mid = (lo + hi) >> 1;
        if (xs[mid]! <= w) lo = mid;
        else hi = mid;
      }
      return ys[lo]! + ((w - xs[lo]!) / (xs[hi]! - xs[lo]!)) * (ys[hi]! - ys[lo]!);
    }
  }
}

export interface SelectionEffects {
  /** S(z): the redshift selection (1 without one). */
  selection(z: number): number;
  /** E(z): the fraction kept by the equivalent-width cut (1 without one). */
  equivalentWidthKept(z: number): number;
  /** S(z) E(z): what multiplies the density of detected sources at true z. */
  weight(z: number): number;
  /** A(z) in magnitudes (0 without). */
  attenuation(z: number): number;
  /**
   * The blend B(z) the measured equivalent width holds: 1 + b (1 without blending), or with blended
   * lines at their own wavelengths (T_0 + sum_i r_i T_i) / T_0 where the line's transmission T_0 > 0,
   * sum_i r_i T_i where it is 0 (1 + sum_i r_i without a filter).
   */
  blend(this: void, z: number): number;
  /**
   * A line flux's transmission at z, relative to the filter's peak: T(lambda_0 (1 + z)) (1 without a
   * filter), plus sum_i r_i T(lambda_i (1 + z)) of the blended lines given at their own wavelengths.
   * 1 for the other kinds.
   */
  lineTransmission(this: void, z: number): number;
  /**
   * What the effects add to a(z) of obs = a + slope log10 u: log10(1 + b) - 0.4 A(z) for a line
   * flux, A(z) for an apparent magnitude, 0 for a threshold.
   */
  obsShift(this: void, z: number): number;
  /** Redshifts strictly inside (lo, hi) where an effect has a kink (table nodes). */
  breaks(lo: number, hi: number): number[];
}

/** The redshift selection that applies to a population: its own, else the detection's. */
export function redshiftSelectionOf(detection: Detection, population: Population): ZParam | undefined {
  return population.redshiftSelection ?? detection.redshiftSelection;
}

/**
 * The lines a line survey measures together for a population with blended lines: the line itself
 * (ratio 1) first, then each blended line. Undefined without blended lines.
 */
function measuredLines(detection: Detection, population: Population): BlendedLine[] | undefined {
  if (detection.kind !== 'line_flux' || !population.blendedLines) return undefined;
  const line = population.lineAngstrom ?? detection.lineAngstrom;
  if (line === undefined) return undefined;
  return [{ restAngstrom: line, ratio: 1 }, ...population.blendedLines];
}

/**
 * Redshifts strictly inside (lo, hi) where the blend of lines at their own wavelengths has a jump or
 * a kink: where each line, redshifted, reaches the ends of the filter's range (a top hat's or a cut
 * gaussian's transmission jumps there, a table's has a kink), and where a blended line crosses a
 * row of a tabulated filter (the line's own rows are the count's filter cuts already,
 * src/counts/engine.ts filterBreaks).
 */
function blendCuts(detection: Detection, lines: BlendedLine[], lo: number, hi: number): number[] {
  const filter = detection.kind === 'line_flux' ? detection.filter : undefined;
  if (!filter) return [];
  const out: number[] = [];
  const [wLo, wHi] = filterRangeAngstrom(filter);
  lines.forEach((l, k) => {
    out.push(wLo / l.restAngstrom - 1, wHi / l.restAngstrom - 1);
    if (k > 0 && filter.table) for (const wl of filter.table.wavelengthAngstrom) out.push(wl / l.restAngstrom - 1);
  });
  return out.filter((z) => z - lo > 1e-9 && hi - z > 1e-9);
}

/**
 * Where g(z) = target for each target, g sampled at 33 points of each piece between `cuts` (g
 * continuous inside a piece), each crossing found by bisection.
 */
function crossings(g: (z: number) => number, cuts: number[], targets: readonly number[]): number[] {
  const out: number[] = [];
  for (let k = 0; k + 1 < cuts.length; k++) {
    const a = cuts[k]!;
    const b = cuts[k + 1]!;
    // just inside the piece: at its ends the transmission may take the value of the next piece
    const at = (j: number) => a + (b - a) * (1e-12 + ((1 - 2e-12) * j) / 32);
    let za = at(0);
    let ga = g(za);
    for (let j = 1; j <= 32; j++) {
      const zb = at(j);
      const gb = g(zb);
      for (const t of targets) {
        if ((ga - t) * (gb - t) < 0) out.push(bisectCrossing(g, t, za, zb, ga));
      }
      za = zb;
      ga = gb;
    }
  }
  return out;
}

/** The effects of the detection and the population together, as functions of z. */
export function selectionEffects(detection: Detection, population: Population): SelectionEffects {
  const sel = redshiftSelectionOf(detection, population);
  const att = population.attenuation;
  const filter = detection.kind === 'line_flux' ? detection.filter : undefined;
  // without a filter every line has T = 1: the blend is 1 + sum_i r_i at every z, blend_ratio's
  const lines = filter ? measuredLines(detection, population) : undefined;
  const through = (angstrom: number, z: number): number => (filter ? transmission(filter, angstrom * (1 + z)) : 1);
  const line = detection.kind === 'line_flux' ? (population.lineAngstrom ?? detection.lineAngstrom) : undefined;
  let lineTransmission: (z: number) => number = () => 1;
  let blend: (z: number) => number;
  // a blend_ratio given as a table or an expression in z (blended lines at their own wavelengths
  // take the other branch, and a ratio given as a number stays the constant factor it was)
  const varying =
    !lines && population.blendRatio && !population.blendRatio.constant ? population.blendRatio : undefined;
  if (lines) {
    lineTransmission = (z) => {
      let t = through(lines[0]!.restAngstrom, z);
      for (let k = 1; k < lines.length; k++) t += lines[k]!.ratio * through(lines[k]!.restAngstrom, z);
      return t;
    };
    blend = (z) => {
      const t0 = through(lines[0]!.restAngstrom, z);
      let s = 0;
      for (let k = 1; k < lines.length; k++) s += lines[k]!.ratio * through(lines[k]!.restAngstrom, z);
      return t0 > 0 ? (t0 + s) / t0 : s;
    };
  } else if (varying) {
    if (line !== undefined) lineTransmission = (z) => through(line, z);
    blend = (z) => 1 + varying.at(z);
  } else {
    if (line !== undefined) lineTransmission = (z) => through(line, z);
    const ratio = population.blendedLines?.reduce((sum, b) => sum + b.ratio, 0) ?? population.blendRatio?.at(0);
    const blendFactor = 1 + (ratio ?? 0);
    blend = () => blendFactor;
  }
  const cut = detection.equivalentWidthCut;
  const ew = population.equivalentWidths;
  const selection = sel ? (z: number) => sel.at(z) : () => 1;
  const attenuation = att ? (z: number) => att.at(z) : () => 0;
  let equivalentWidthKept: (z: number) => number = () => 1;
  if (cut && ew && (lines || varying)) {
    // the blend varies with z: nothing measured (B = 0, the lines all outside the filter) keeps nothing
    const observed = cut.frame === 'observed';
    equivalentWidthKept = (z) => {
      const b = blend(z);
      return b > 0 ? fractionAbove(ew, cut.angstrom / ((observed ? 1 + z : 1) * b)) : 0;
    };
  } else if (cut && ew) {
    const w = cut.angstrom / blend(0);
    if (cut.frame === 'rest') {
      const kept = fractionAbove(ew, w);
      equivalentWidthKept = () => kept;
    } else {
      equivalentWidthKept = (z) => fractionAbove(ew, w / (1 + z));
    }
  }
  const logBlend = lines || varying ? 0 : Math.log10(blend(0));
  const obsShift =
    detection.kind === 'line_flux'
      ? varying
        ? att
          ? (z: number) => Math.log10(blend(z)) - 0.4 * att.at(z)
          : (z: number) => Math.log10(blend(z))
        : att
          ? (z: number) => logBlend - 0.4 * att.at(z)
          : () => logBlend
      : detection.kind === 'magnitude' && att
        ? attenuation
        : () => 0;
  // where a parameter in z has a kink or a jump in its slope: a table's rows, an expression's kinks
  // (min, max, abs) and narrow features
  const paramCuts = (p: ZParam | undefined, lo: number, hi: number, out: number[]): void => {
    if (p && !p.constant && typeof p.source === 'object') for (const [zt] of p.source.table) out.push(zt);
    if (p?.kinks) out.push(...p.kinks(lo, hi));
    if (p?.features) out.push(...p.features(lo, hi));
  };
  const breaks = (lo: number, hi: number): number[] => {
    const out: number[] = [];
    // an expression's kinks (min, max, abs): a selection min(1, max(0, 3*(z - 1.2))) and an
    // attenuation 0.5 + max(0, 1.4 - z) moved the slice holding them by 3.4e-6 uncut; its narrow
    // features (src/survey/zparam.ts featureCuts): a slice 0.5 wide holding the dip of a selection
    // 1 - 0.9 exp(-((z - 1.1)/0.001)^2) was counted 3.1e-3 high uncut
    for (const p of [sel, att, varying]) paramCuts(p, lo, hi, out);
    if (lines) {
      const jumps = blendCuts(detection, lines, lo, hi);
      out.push(...jumps);
      if (cut && ew && ew.model === 'table') {
        // fractionAbove is linear between the table's widths: kinks where w_cut / ((1 + z) B(z)) = W_k
        // (observed) or w_cut / B(z) = W_k (rest), B(z) continuous between the blend's cuts
        const observed = cut.frame === 'observed';
        const g = (z: number) => {
          const b = blend(z);
          return b > 0 ? cut.angstrom / ((observed ? 1 + z : 1) * b) : Infinity;
        };
        const pieces = [lo, ...jumps.sort((a, b) => a - b), hi];
        out.push(
          ...crossings(
            g,
            pieces,
            ew.widthAngstrom.filter((wk) => wk > 0),
          ),
        );
      }
    } else if (varying && cut && ew && ew.model === 'table') {
      // fractionAbove is linear between the table's widths: kinks where w_cut / B(z) = W_k (rest) or
      // w_cut / ((1 + z) B(z)) = W_k (observed), B(z) = 1 + b(z) continuous between the ratio's cuts
      const observed = cut.frame === 'observed';
      const g = (z: number) => cut.angstrom / ((observed ? 1 + z : 1) * blend(z));
      const own: number[] = [];
      paramCuts(varying, lo, hi, own);
      const pieces = [lo, ...own.filter((z) => z - lo > 1e-9 && hi - z > 1e-9).sort((a, b) => a - b), hi];
      out.push(
        ...crossings(
          g,
          pieces,
          ew.widthAngstrom.filter((wk) => wk > 0),
        ),
      );
    } else if (cut && ew && ew.model === 'table' && cut.frame === 'observed') {
      // fractionAbove is linear between the table's widths: kinks where w_cut / ((1 + z)(1 + b)) = W_k
      const blendFactor = blend(0);
      for (const wk of ew.widthAngstrom) if (wk > 0) out.push(cut.angstrom / (blendFactor * wk) - 1);
    }
    const kept = out.filter((z) => z - lo > 1e-9 && hi - z > 1e-9).sort((a, b) => a - b);
    return kept.filter((z, i) => i === 0 || z - kept[i - 1]! > 1e-9);
  };
  return {
    selection,
    equivalentWidthKept,
    weight: (z) => selection(z) * equivalentWidthKept(z),
    attenuation,
    blend,
    lineTransmission,
    obsShift,
    breaks,
  };
}
