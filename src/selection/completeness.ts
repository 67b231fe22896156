/**
 * Completeness: the fraction of sources above the hard limit that are detected, as a function of
 * the observed value `obs` (the histogram variable: apparent AB magnitude, log10 measured line
 * flux, log10 quantity or absolute magnitude).
 *
 * docs/survey-file.md ("Completeness") defines the logistic c = 1 / (1 + exp((x - half) / width)) in a variable x that
 * grows towards faint sources: x = apparent magnitude (magnitude kind), x = -log10 flux (line_flux),
 * x = absolute magnitude (threshold, magnitude variable). For the threshold kind with a luminosity
 * (or mass) variable, x = log10 quantity grows towards BRIGHT sources, so the logistic is applied
 * to -x (completeness rises with the quantity, as any real survey's does): c = 1/(1+exp((half-x)/width)).
 * Tables are interpolated linearly in x as given, end fractions held.
 */
import type { Completeness, DetectionKind } from '../model/detection.js';
import type { PopulationVariable } from '../model/population.js';
import { interpLinear } from '../numerics/interpolate.js';

export type CompletenessFn = (obs: number) => number;

/** +1 when x = obs, -1 when x = -obs (line_flux: x = -log10 flux). */
export function completenessOrientation(kind: DetectionKind): 1 | -1 {
  return kind === 'line_flux' ? -1 : 1;
}

/** The functions made, by curve (the survey's completeness object), kind and variable. */
const madeFunctions = new WeakMap<Completeness, Map<string, CompletenessFn>>();

/**
 * The completeness as a function of obs. One function per curve, kind and variable, made once and
 * kept with the curve: the populations of one survey then call the same function, so that code V8
 * has optimised for one population's calls is not thrown away at the next population's (a
 * different function object of the same source is a "wrong call target" to optimised code; the
 * three-population narrow-band sample's histogram loop was compiled four times).
 */
export function completenessFunction(
  c: Completeness,
  kind: DetectionKind,
  variable: PopulationVariable,
): CompletenessFn {
  let byKey = madeFunctions.get(c);
  if (!byKey) madeFunctions.set(c, (byKey = new Map<string, CompletenessFn>()));
  const key = `${kind} ${variable}`;
  let fn = byKey.get(key);
  if (!fn) byKey.set(key, (fn = makeCompletenessFunction(c, kind, variable)));
  return fn;
}

function makeCompletenessFunction(c: Completeness, kind: DetectionKind, variable: PopulationVariable): CompletenessFn {
  const sign = completenessOrientation(kind);
  if (c.model === 'logistic') {
    const { half, width } = c;
    // Direction in which completeness falls: +1 means falls as x grows.
    const falls = kind === 'threshold' && variable === 'luminosity' ? -1 : 1;
    return (obs) => {
      const x = sign * obs;
      const arg = (falls * (x - half)) / width;
      if (arg > 700) return 0;
      return 1 / (1 + Math.exp(arg));
    };
  }
  const xs = c.x;
  const fs = c.fraction;
  return (obs) => interpLinear(xs, fs, sign * obs);
}

/**
 * Where the completeness varies, for quadrature: break points (table nodes or the logistic's half
 * point), a panel scale (the logistic width; Infinity for tables) and the obs range outside which
 * completeness is constant (the table's end values, or the logistic within 2.1e-9 of 1 or 4.3e-18 of 0).
 */
export function completenessBreaks(
  c: Completeness,
  kind: DetectionKind,
  variable: PopulationVariable = 'magnitude',
): { points: number[]; scale: number; varying: [number, number] } {
  const sign = completenessOrientation(kind);
  const toObs = (x: number) => sign * x;
  if (c.model === 'logistic') {
    // Brighter than half - 20 width, 1 - c < 2.1e-9; fainter than half + 40 width, c < 4.3e-18.
    // The threshold kind's luminosity variable has x growing towards bright sources (the logistic
    // applied to -x, above): its faint side is below half - 40 width. Taken the other way round, a
    // limit 22 widths below half counted its sources there at c(half - 20 width) = 2e-9, not at
    // their own c (down to 3e-10): 2e-3 too many with alpha = -2.3.
    const falls = kind === 'threshold' && variable === 'luminosity' ? -1 : 1;
    const a = toObs(c.half - falls * 20 * c.width);
    const b = toObs(c.half + falls * 40 * c.width);
    return { points: [toObs(c.half)], scale: c.width, varying: [Math.min(a, b), Math.max(a, b)] };
  }
  const ends = [toObs(c.x[0]!), toObs(c.x[c.x.length - 1]!)];
  return { points: c.x.map(toObs), scale: Infinity, varying: [Math.min(...ends), Math.max(...ends)] };
}
