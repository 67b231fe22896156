/**
 * Completeness: the fraction of sources above the hard limit that are detected, as a function of
 * the observed value `obs` (the histogram variable: apparent AB magnitude, log10 measured line
 * flux, log10 quantity or absolute magnitude).
 *
 * survey-file.md defines the logistic c = 1 / (1 + exp((x - half) / width)) in a variable x that
 * grows towards faint sources: x = apparent magnitude (magnitude kind), x = -log10 flux (line_flux),
 * x = absolute magnitude (threshold, magnitude variable). For the threshold kind with a luminosity
 * (or mass) variable, x = log10 quantity grows towards BRIGHT sources, so the logistic is applied
 * to -x (completeness rises with the quantity, as any real survey's does): c = 1/(1+exp((half-x)/width)).
 * Tables are interpolated linearly in x as given, end fractions held.
 */
import type { Completeness, DetectionKind, PopulationVariable } from '../survey/types.js';
import { interpLinear } from '../numerics/interpolate.js';

export type CompletenessFn = (obs: number) => number;

/** +1 when x = obs, -1 when x = -obs (line_flux: x = -log10 flux). */
export function completenessOrientation(kind: DetectionKind): 1 | -1 {
  return kind === 'line_flux' ? -1 : 1;
}

export function completenessFunction(
  c: Completeness,
  kind: DetectionKind,
  variable: PopulationVariable,
): CompletenessFn {
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
 * Points in obs where the completeness changes fast or has kinks, for quadrature panel splits:
 * table nodes, or the logistic's half point with a scale.
 */
export function completenessBreaks(c: Completeness, kind: DetectionKind): { points: number[]; scale: number } {
  const sign = completenessOrientation(kind);
  if (c.model === 'logistic') return { points: [sign * c.half], scale: c.width };
  return { points: c.x.map((x) => sign * x), scale: Infinity };
}
