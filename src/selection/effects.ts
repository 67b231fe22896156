/**
 * Selection effects as functions of redshift (docs/survey-file.md, "Selection effects"):
 *
 *  - redshift selection S(z): the fraction of sources at true z that the selection keeps (the
 *    population's own, or else the detection's); it multiplies the density of detected sources;
 *  - line blending b: a line survey measures F = L T (1 + b) 10^(-0.4 A) / (4 pi D_L^2), so the
 *    observed value obs = log10 F moves by log10(1 + b); the luminosity function stays unblended;
 *  - attenuation A(z) (mag): the luminosity function is intrinsic; a line flux is dimmed by
 *    10^(-0.4 A) (obs moves by -0.4 A), an apparent magnitude grows by A (grey over the band);
 *  - equivalent-width cut: the kept fraction E(z) = P(W_line > W_cut / (1 + b)) (rest frame) or
 *    P(W_line > W_cut / ((1 + z)(1 + b))) (observed frame), taken as independent of luminosity:
 *    the cut applies to the measured width, which holds the blended lines, and dust dims line and
 *    continuum alike.
 *
 * The density of detected sources at z is then S(z) E(z) times the plain one evaluated with obs
 * shifted by obsShift(z). With S = 1, b = 0, A = 0 and a cut of 0 everything is exactly as without.
 */
import type { Detection } from '../model/detection.js';
import type { Population } from '../model/population.js';
import type { EquivalentWidthDistribution } from '../model/selection.js';
import type { ZParam } from '../model/zparam.js';
import { upperGamma } from '../numerics/gamma.js';

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
  /** 1 + b (1 without blending). */
  blendFactor: number;
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

/** The effects of the detection and the population together, as functions of z. */
export function selectionEffects(detection: Detection, population: Population): SelectionEffects {
  const sel = redshiftSelectionOf(detection, population);
  const att = population.attenuation;
  const blendFactor = 1 + (population.blendRatio ?? 0);
  const cut = detection.equivalentWidthCut;
  const ew = population.equivalentWidths;
  const selection = sel ? (z: number) => sel.at(z) : () => 1;
  const attenuation = att ? (z: number) => att.at(z) : () => 0;
  let equivalentWidthKept: (z: number) => number = () => 1;
  if (cut && ew) {
    const w = cut.angstrom / blendFactor;
    if (cut.frame === 'rest') {
      const kept = fractionAbove(ew, w);
      equivalentWidthKept = () => kept;
    } else {
      equivalentWidthKept = (z) => fractionAbove(ew, w / (1 + z));
    }
  }
  const logBlend = Math.log10(blendFactor);
  const obsShift =
    detection.kind === 'line_flux'
      ? att
        ? (z: number) => logBlend - 0.4 * att.at(z)
        : () => logBlend
      : detection.kind === 'magnitude' && att
        ? attenuation
        : () => 0;
  const breaks = (lo: number, hi: number): number[] => {
    const out: number[] = [];
    for (const p of [sel, att]) {
      if (p && !p.constant && typeof p.source === 'object') for (const [zt] of p.source.table) out.push(zt);
      // an expression's kinks (min, max, abs): a selection min(1, max(0, 3*(z - 1.2))) and an
      // attenuation 0.5 + max(0, 1.4 - z) moved the slice holding them by 3.4e-6 uncut
      if (p?.kinks) out.push(...p.kinks(lo, hi));
      // an expression's narrow features (src/survey/zparam.ts featureCuts): a slice 0.5 wide holding
      // the dip of a selection 1 - 0.9 exp(-((z - 1.1)/0.001)^2) was counted 3.1e-3 high uncut
      if (p?.features) out.push(...p.features(lo, hi));
    }
    if (cut && ew && ew.model === 'table' && cut.frame === 'observed') {
      // fractionAbove is linear between the table's widths: kinks where w_cut / ((1 + z)(1 + b)) = W_k
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
    blendFactor,
    obsShift,
    breaks,
  };
}
