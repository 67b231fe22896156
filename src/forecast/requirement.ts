/**
 * What would reach a target precision: the area needed at the survey's depth, and the limit needed
 * at the survey's area, for each target sigma (Fisher, with cosmic variance unless switched off).
 *
 * Area: the Poisson information is linear in area; with cosmic variance the fractions are asked
 * again at each trial area (the fields grow with the area, so the fractions change). Root finding
 * in ln(area) by Brent's method inside [1e-6 deg^2, full sky = 41 252.96 deg^2].
 * Limit: the detection limit is moved by a constant (dex of line flux, magnitudes, or dex / magnitudes
 * of the threshold quantity; a completeness curve moves with it, as a deeper exposure moves both),
 * the density grid rebuilt and the Fisher matrix recomputed. The search bracket is +-3 dex around
 * the survey's limit (line flux, luminosity threshold) or +-7.5 mag (magnitude kinds).
 * Either may be unreachable; the statement says why (beyond the full sky, a cosmic-variance floor,
 * or not within the bracket).
 */
import type { FlatCosmology } from '../cosmology/flat-cosmology.js';
import type { Completeness, Detection } from '../model/detection.js';
import type { Population } from '../model/population.js';
import type { Survey } from '../model/survey.js';
import type { ZParam } from '../model/zparam.js';
import { FULL_SKY_DEG2, MIN_AREA_DEG2, SR_PER_DEG2 } from '../model/sky.js';
import { precise } from '../render/format.js';
import { fluxDensityOfAbMagnitude } from '../model/photometry.js';
import { brent, expandBracket } from '../numerics/roots.js';
import { buildDensityGrid } from './grid.js';
import {
  fisherParts,
  fisherPartsAt,
  marginaliseCorrelated,
  summariseFisher,
  type CosmicVariancePrior,
  type FisherParts,
} from './fisher.js';
import { percentilesOf } from '../counts/model-draws.js';
import {
  cosmicVarianceCorrelation,
  type CosmicVarianceCorrelationSource,
  type CosmicVarianceSource,
} from './cosmic-variance-input.js';
import type { ParameterName } from './parameters.js';
import type { Requirement, RequirementEntry } from '../model/outputs/forecast.js';

export interface RequirementContext {
  survey: Survey;
  population: Population;
  cosmo: FlatCosmology;
  names: readonly ParameterName[];
  /** Parts at the survey's own area and depth. */
  parts: FisherParts;
  cosmicVariance?: CosmicVarianceSource;
  /** The correlation of the slices' nuisances at a trial survey (default cosmicVarianceCorrelation). */
  cosmicVarianceCorrelation?: CosmicVarianceCorrelationSource;
  /**
   * Under the model's own uncertainty: the draws' offsets [d log10 phi*, d characteristic, d alpha]
   * and each draw's parts at the survey's own area and depth; every sigma is then the
   * `probability` percentile (type 7) of the draws' sigmas, so that the area or limit found meets
   * the target in that fraction of the draws (each draw's sigma falls as the area grows or the
   * limit deepens). The cosmic-variance fractions are the assumed model's at each trial survey.
   */
  spread?: {
    thetas: readonly (readonly number[])[];
    parts: readonly FisherParts[];
    probability: number;
    /**
     * The draws' parts at each trial depth (by depth offset), shared by the searches at several
     * probabilities: the parts do not depend on the probability, so p50 and p84 pay once for a depth
     * both try.
     */
    depthParts?: Map<number, { plain: FisherParts; list: readonly FisherParts[] }>;
  };
}

function sigmaFrom(parts: FisherParts, prior: CosmicVariancePrior | undefined): number[] {
  const m = prior ? marginaliseCorrelated(parts.matrix, parts.slices, prior) : parts.matrix;
  const s = summariseFisher(m);
  return s ? s.sigma : parts.matrix.map(() => Infinity);
}

/** Each parameter's sigma: of the one set of parts, or the percentile over the draws' parts. */
function sigmaOf(
  partsList: readonly FisherParts[],
  prior: CosmicVariancePrior | undefined,
  p: number | undefined,
): number[] {
  if (p === undefined) return sigmaFrom(partsList[0]!, prior);
  const per = partsList.map((parts) => (parts.count > 0 ? sigmaFrom(parts, prior) : parts.matrix.map(() => Infinity)));
  return per[0]!.map((_, j) => {
    const v = percentilesOf(
      per.map((s) => s[j]!),
      [p],
    )[0]!;
    return Number.isNaN(v) ? Infinity : v;
  });
}

/** Each slice's expected count. */
const countsOf = (parts: FisherParts): number[] => parts.slices.map((s) => s.count);

const isZero = (theta: readonly number[]) => theta.every((v) => v === 0);

function scaleParts(p: FisherParts, f: number): FisherParts {
  return {
    matrix: p.matrix.map((r) => r.map((v) => v * f)),
    slices: p.slices.map((s) => ({ count: s.count * f, b: s.b.map((v) => v * f) })),
    count: p.count * f,
  };
}

function withArea(survey: Survey, areaDeg2: number): Survey {
  return { ...survey, areaDeg2, areaSr: areaDeg2 * SR_PER_DEG2 };
}

/** Depth shift: +delta is deeper (dex of flux or quantity; magnitudes for magnitude kinds). */
function depthUnit(survey: Survey, p: Population): 'dex' | 'mag' {
  const d = survey.detection;
  if (d.kind === 'magnitude') return 'mag';
  if (d.kind === 'threshold' && p.variable === 'magnitude') return 'mag';
  return 'dex';
}

function shiftZParam(z: ZParam, by: number): ZParam {
  return { source: z.source, constant: z.constant, at: (x) => z.at(x) + by };
}

function shiftCompleteness(c: Completeness | undefined, dx: number): Completeness | undefined {
  if (!c) return undefined;
  if (c.model === 'logistic') return { ...c, half: c.half + dx };
  return { ...c, x: c.x.map((v) => v + dx) };
}

/**
 * What a limit found assumes of the completeness: it moved with the limit (deeperSurvey). A file
 * that moves detection.limit alone keeps its completeness curve where it was and counts fewer faint
 * sources than the forecast did, so the sentence says what to write.
 */
function completenessNote(survey: Survey, entries: readonly RequirementEntry[]): string[] {
  const c = survey.detection.completeness;
  if (!c || entries.every((e) => e.limit === null)) return [];
  const what = c.model === 'logistic' ? 'completeness.half' : 'every x of completeness.table';
  return [
    `each limit needed assumes the completeness curve moves with it, as a deeper exposure moves both: write ${what} deeper by as much as detection.limit (moving the limit alone keeps the curve where it is and gives a larger sigma)`,
  ];
}

/** The survey with its limit moved `delta` deeper, and the limit's new value (in limit_variable). */
export function deeperSurvey(survey: Survey, p: Population, delta: number): { survey: Survey; limit: number } {
  const d = survey.detection;
  let det: Detection;
  let limit: number;
  const zMid = 0.5 * (p.window.min + p.window.max);
  if (d.kind === 'line_flux') {
    // completeness x = -log10 flux grows by delta when the flux limit falls by delta dex
    limit = d.limitCgs * 10 ** -delta;
    det = { ...d, limitCgs: limit, limitGivenJyKms: undefined }; // no longer the Jy km/s the file gave
    const c = shiftCompleteness(d.completeness, delta);
    if (c) det.completeness = c;
  } else if (d.kind === 'magnitude') {
    limit = d.limitMag + delta;
    det = { ...d, limitMag: limit, limitGivenJy: undefined }; // no longer the flux density the file gave
    const c = shiftCompleteness(d.completeness, delta);
    if (c) det.completeness = c;
  } else {
    // luminosity variable: log10 quantity falls by delta; magnitude variable: M grows by delta
    const by = p.variable === 'luminosity' ? -delta : delta;
    const lim = shiftZParam(d.limit, by);
    limit = lim.at(zMid);
    det = { ...d, limit: lim };
    const c = shiftCompleteness(d.completeness, by);
    if (c) det.completeness = c;
  }
  return { survey: { ...survey, detection: det }, limit };
}

export function limitVariable(survey: Survey, p: Population): Requirement['limit_variable'] {
  const d = survey.detection;
  if (d.kind === 'line_flux') return 'line_flux_cgs';
  if (d.kind === 'magnitude') return 'apparent_magnitude';
  return p.variable === 'luminosity' ? 'log10_quantity' : 'absolute_magnitude';
}

const fmt = (x: number): string => precise(x, 3);

export function requirement(ctx: RequirementContext, targets: Record<string, number>): Requirement {
  const { survey, population, cosmo, names } = ctx;
  const source = ctx.cosmicVariance;
  // the joint prior of the slices' nuisances at a trial survey (the correlation depends on its area)
  // (with the trial survey's per-slice counts of the assumed model, as the forecast gives its own)
  const cv = source
    ? (s: Survey, e: readonly number[], pop: Population, counts: readonly number[]): CosmicVariancePrior => ({
        fractions: source(s, e, pop, counts),
        correlation: (ctx.cosmicVarianceCorrelation ?? cosmicVarianceCorrelation)(s, e),
      })
    : undefined;
  const edges = survey.sliceEdges;
  const unit = depthUnit(survey, population);
  const span = unit === 'dex' ? 3 : 7.5;
  const a0 = survey.areaDeg2;

  const spread = ctx.spread;
  const p = spread?.probability;
  // sigma as a function of area (Poisson information scaled; fractions asked at each area)
  const perArea = (spread ? spread.parts : [ctx.parts]).map((q) => scaleParts(q, 1 / a0));
  // the assumed model's slice counts per deg^2 (the cosmic-variance fractions are the assumed model's)
  const countsPerArea = countsOf(scaleParts(ctx.parts, 1 / a0));
  const countsAt = (areaDeg2: number) => countsPerArea.map((n) => n * areaDeg2);
  const sigmaAtArea = (areaDeg2: number, withCv = true): number[] =>
    sigmaOf(
      perArea.map((q) => scaleParts(q, areaDeg2)),
      cv && withCv ? cv(withArea(survey, areaDeg2), edges, population, countsAt(areaDeg2)) : undefined,
      p,
    );
  const depthCache = new Map<string, number[]>();
  const sigmaAtDepth = (delta: number, withCv = true): number[] => {
    const key = `${withCv}:${delta}`;
    const hit = depthCache.get(key);
    if (hit) return hit;
    const s2 = deeperSurvey(survey, population, delta).survey;
    let hitParts = spread?.depthParts?.get(delta);
    if (!hitParts) {
      const grid = buildDensityGrid(s2, population, cosmo, edges);
      const assumed = fisherParts(grid);
      const draws = spread ? spread.thetas.map((th) => (isZero(th) ? assumed : fisherPartsAt(grid, th))) : [assumed];
      hitParts = { plain: assumed, list: draws };
      spread?.depthParts?.set(delta, hitParts);
    }
    const { plain, list } = hitParts;
    const sig =
      spread || plain.count > 0
        ? sigmaOf(list, cv && withCv && plain.count > 0 ? cv(s2, edges, population, countsOf(plain)) : undefined, p)
        : names.map(() => Infinity);
    depthCache.set(key, sig);
    return sig;
  };
  const finite = (v: number) => (Number.isFinite(v) ? v : 1e300);
  const limitOf = (delta: number) => deeperSurvey(survey, population, delta).limit;
  const lv = limitVariable(survey, population);
  // a limit the file wrote as a flux density is quoted in its unit too, "1.55 mJy (15.93 AB)"
  const givenUnit = survey.detection.kind === 'magnitude' ? survey.detection.limitGivenUnit : undefined;
  // a limit the file wrote in Jy km/s is quoted in it too, "0.385 Jy km/s (1.826e-20 erg/s/cm^2)":
  // Jy km/s per erg/s/cm^2 at detection.line, c / nu = 1e10 lambda [Angstrom] (lineFluxOfVelocityFlux)
  const det = survey.detection;
  const jyKmsPerCgs =
    det.kind === 'line_flux' && det.limitGivenJyKms !== undefined && det.lineAngstrom !== undefined
      ? det.lineAngstrom * 1e10
      : undefined;
  const limitText = (x: number) =>
    lv === 'line_flux_cgs'
      ? jyKmsPerCgs !== undefined
        ? `${fmt(x * jyKmsPerCgs)} Jy km/s (${fmt(x)} erg/s/cm^2)`
        : `${fmt(x)} erg/s/cm^2`
      : lv === 'log10_quantity'
        ? `log10 = ${fmt(x)}`
        : lv === 'absolute_magnitude'
          ? `M = ${fmt(x)}`
          : givenUnit
            ? `${fmt(fluxDensityOfAbMagnitude(x, givenUnit))} ${givenUnit} (${fmt(x)} AB)`
            : `${fmt(x)} AB`;

  const byParameter: Record<string, RequirementEntry> = {};
  for (const [name, target] of Object.entries(targets)) {
    const j = names.indexOf(name as ParameterName);
    const notes: string[] = [];
    // --- area
    let area: number | null = null;
    const fArea = (lnA: number) => Math.log(finite(sigmaAtArea(Math.exp(lnA))[j]!) / target);
    const lo = Math.log(MIN_AREA_DEG2);
    const hi = Math.log(FULL_SKY_DEG2);
    const sFull = sigmaAtArea(FULL_SKY_DEG2)[j]!;
    if (!(sFull <= target)) {
      const poissonFull = sigmaAtArea(FULL_SKY_DEG2, false)[j]!;
      if (cv && poissonFull <= target) {
        notes.push(
          `no area reaches sigma(${name}) = ${fmt(target)} at this depth: cosmic variance sets a floor of ${fmt(sFull)} even over the full sky (Poisson alone would need ${fmt(a0 * (sigmaAtArea(a0, false)[j]! / target) ** 2)} deg^2)`,
        );
      } else {
        notes.push(
          `no area reaches sigma(${name}) = ${fmt(target)} at this depth: even the full sky (${fmt(FULL_SKY_DEG2)} deg^2) gives ${fmt(sFull)}`,
        );
      }
    } else if (sigmaAtArea(MIN_AREA_DEG2)[j]! <= target) {
      notes.push(`sigma(${name}) = ${fmt(target)} is reached by any area down to ${MIN_AREA_DEG2} deg^2`);
    } else {
      const start = Math.min(Math.max(Math.log(a0), lo + 0.1), hi - 0.1);
      const [b0, b1] = expandBracket(fArea, start - 0.05, start + 0.05, { lower: lo, upper: hi, maxIter: 200 });
      area = Math.exp(brent(fArea, b0, b1, { tol: 1e-10 }));
    }
    // --- limit
    let limit: number | null = null;
    const fDepth = (delta: number) => Math.log(finite(sigmaAtDepth(delta)[j]!) / target);
    const sDeep = sigmaAtDepth(span)[j]!;
    const sShallow = sigmaAtDepth(-span)[j]!;
    if (!(sDeep <= target)) {
      const poissonDeep = sigmaAtDepth(span, false)[j]!;
      const why =
        cv && poissonDeep <= target
          ? ` (cosmic variance sets the floor; Poisson alone would give ${fmt(poissonDeep)})`
          : '';
      notes.push(
        `no limit within ${span} ${unit} of the survey's reaches sigma(${name}) = ${fmt(target)} at this area: even ${limitText(limitOf(span))} gives ${fmt(sDeep)}${why}`,
      );
    } else if (sShallow <= target) {
      notes.push(
        `sigma(${name}) = ${fmt(target)} is reached by every limit within ${span} ${unit} of the survey's, down to the shallowest searched, ${limitText(limitOf(-span))}`,
      );
    } else {
      const [d0, d1] = expandBracket(fDepth, -0.05, 0.05, { lower: -span, upper: span, maxIter: 200 });
      limit = limitOf(brent(fDepth, d0, d1, { tol: 1e-9 }));
    }
    byParameter[name] = { target, area_deg2: area, limit, notes };
  }
  const entries = Object.values(byParameter);
  const allArea = entries.every((e) => e.area_deg2 !== null);
  const allLimit = entries.every((e) => e.limit !== null);
  const deeperIsLarger = lv === 'apparent_magnitude' || lv === 'absolute_magnitude';
  const limits = entries.map((e) => e.limit as number);
  return {
    target: { ...targets },
    area_deg2: allArea ? Math.max(...entries.map((e) => e.area_deg2 as number)) : null,
    limit: allLimit ? (deeperIsLarger ? Math.max(...limits) : Math.min(...limits)) : null,
    limit_variable: lv,
    ...(givenUnit ? { limit_unit: givenUnit } : {}),
    ...(jyKmsPerCgs !== undefined ? { limit_jy_km_s_per_cgs: jyKmsPerCgs } : {}),
    by_parameter: byParameter,
    search: { area_deg2: [MIN_AREA_DEG2, FULL_SKY_DEG2], limit: [limitOf(-span), limitOf(span)] },
    notes: [...entries.flatMap((e) => e.notes), ...completenessNote(survey, entries)],
  };
}
