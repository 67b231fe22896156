/**
 * Parameters that may vary with redshift (docs/survey-file.md, "Parameters that vary with redshift"): a number, a table
 * {table: [[z, value], ...]} (linear interpolation in z, end values held outside), or an
 * expression in z (src/survey/expressions.ts).
 */
import { inputError } from '../errors.js';
import { precise } from '../render/format.js';
import type { BiasSource, ZParam } from '../model/zparam.js';
import { compileExpression } from './expressions.js';
import { CAPS, describeRange, inRange, type Range } from '../model/limits.js';
import { down, up, type Bounds } from './interval.js';
import { keptBreaks } from '../numerics/quadrature.js';
import { createGrowth } from '../uncertainty/growth.js';

export type ZTable = { table: [number, number][] };

export function isZTable(v: unknown): v is ZTable {
  return typeof v === 'object' && v !== null && !Array.isArray(v) && 'table' in v;
}

/** Bounds of an expression's values over a range of z, kept beside the ZParam the loader made of it. */
const expressionBounds = new WeakMap<ZParam<BiasSource>, Bounds>();

/**
 * What `featureCuts` reads of an expression as the file wrote it (for a mapped parameter, such as
 * phi* from log10_phi_star, the written expression's), and the cuts it found, which the ZParam's
 * `features` returns.
 */
interface FeatureAnalysis {
  bounds: Bounds;
  slope: Bounds;
  cuts: number[];
}
const featureAnalysis = new WeakMap<ZParam<BiasSource>, FeatureAnalysis>();

export function constantParam(v: number): ZParam {
  return { source: v, constant: true, at: () => v };
}

/** Linear interpolation through (zs, vs), zs strictly increasing; end values held outside. */
export function interpolator(zs: readonly number[], vs: readonly number[]): (z: number) => number {
  const n = zs.length;
  const z0 = zs[0]!;
  const zn = zs[n - 1]!;
  const v0 = vs[0]!;
  const vn = vs[n - 1]!;
  return (z: number) => {
    if (z <= z0) return v0;
    if (z >= zn) return vn;
    let lo = 0;
    let hi = n - 1;
    while (hi - lo > 1) {
      const mid = (lo + hi) >> 1;
      if (zs[mid]! <= z) lo = mid;
      else hi = mid;
    }
    const za = zs[lo]!;
    const va = vs[lo]!;
    return va + ((z - za) / (zs[hi]! - za)) * (vs[hi]! - va);
  };
}

/**
 * Build a ZParam from what the file holds (already shape-checked by the schema).
 * Throws bad_table (z not strictly increasing) or bad_expression.
 */
export function makeZParam(value: number | string | ZTable, file: string, keyPath: string): ZParam {
  if (typeof value === 'number') return constantParam(value);
  if (typeof value === 'string') {
    const e = compileExpression(value, file, keyPath);
    const cuts: number[] = [];
    const p: ZParam = {
      source: value,
      constant: e.constant,
      at: e.fn,
      ...(e.kinks.length > 0 ? { kinks: (lo: number, hi: number) => signChanges(e.kinks, lo, hi) } : {}),
      ...(e.constant
        ? {}
        : { features: (lo: number, hi: number) => (cuts.length > 0 ? keptBreaks(cuts.slice(), lo, hi) : []) }),
    };
    if (!e.constant) {
      expressionBounds.set(p, e.bounds);
      featureAnalysis.set(p, { bounds: e.bounds, slope: e.slope, cuts });
    }
    return p;
  }
  const rows = value.table;
  if (rows.length > CAPS.tableRows) {
    throw inputError(
      'too_large',
      file,
      `${keyPath}.table`,
      `has ${rows.length} rows, more than the ${CAPS.tableRows} a table may have`,
      'resample it to fewer rows',
    );
  }
  const zs = rows.map((r) => r[0]);
  const vs = rows.map((r) => r[1]);
  for (let i = 1; i < zs.length; i++) {
    if (!(zs[i]! > zs[i - 1]!)) {
      throw inputError(
        'bad_table',
        file,
        `${keyPath}.table[${i}]`,
        `the redshifts of the table are not strictly increasing (z = ${zs[i]} follows z = ${zs[i - 1]})`,
        'list the rows in increasing z without repeats',
      );
    }
  }
  const source = { table: rows.map((r) => [r[0], r[1]] as [number, number]) };
  return { source, constant: vs.every((v) => v === vs[0]), at: interpolator(zs, vs) };
}

/**
 * A bias given as {over_growth: B}: b(z) = B / D(z), D the linear growth factor of flat Lambda-CDM
 * with matter density omegaM, D(0) = 1 (src/uncertainty/growth.ts, the same D the cosmic variance
 * uses). Smooth (no kinks, no narrow features) and, D falling with z, rising with z: its least and
 * greatest values over a window are at the window's ends, which `checkParam` samples. B must be a
 * finite number above 0 (the caller checks it).
 */
export function growthBiasParam(b: number, omegaM: number): ZParam<BiasSource> {
  const growth = createGrowth(omegaM);
  return { source: { over_growth: b }, constant: false, at: (z) => b / growth(z) };
}

/**
 * A ZParam whose value is f(inner value); keeps the file's source for display. f must not
 * decrease (10^v, a unit's factor, a magnitude's offset): an expression's bounds are then f of
 * its bounds, widened by rounding.
 */
export function mapParam(p: ZParam, f: (v: number) => number): ZParam {
  const inner = p.at;
  if (p.constant) {
    const v = f(inner(0));
    return { source: p.source, constant: true, at: () => v };
  }
  const mapped: ZParam = {
    source: p.source,
    constant: false,
    at: (z) => f(inner(z)),
    ...(p.kinks ? { kinks: p.kinks } : {}),
    ...(p.features ? { features: p.features } : {}),
  };
  const analysis = featureAnalysis.get(p);
  if (analysis) featureAnalysis.set(mapped, analysis);
  const bounds = expressionBounds.get(p);
  if (bounds) {
    expressionBounds.set(mapped, (lo, hi) => {
      const [a, b] = bounds(lo, hi);
      return [down(down(f(a))), up(up(f(b)))];
    });
  }
  return mapped;
}

/**
 * Where the functions change sign strictly inside (lo, hi), more than 1e-9 from either end: each
 * found on 256 even steps and bisected to 1e-13 of the range (a function that touches 0 without
 * crossing it between two steps is not seen, nor is a kink it would mark: the integrals converge
 * there as they did before kinks were cut).
 */
export function signChanges(fs: readonly ((z: number) => number)[], lo: number, hi: number): number[] {
  const steps = 256;
  const out: number[] = [];
  if (!(hi > lo)) return out;
  const zAt = (i: number) => (i === steps ? hi : lo + ((hi - lo) * i) / steps);
  for (const g of fs) {
    let za = lo;
    let ga = g(za);
    for (let i = 1; i <= steps; i++) {
      const zb = zAt(i);
      const gb = g(zb);
      if (ga === 0) out.push(za);
      else if (Number.isFinite(ga) && Number.isFinite(gb) && ga * gb < 0) {
        let [a, b, fa] = [za, zb, ga];
        while (b - a > 1e-13 * (hi - lo)) {
          const m = 0.5 * (a + b);
          const fm = g(m);
          if (fm === 0) {
            a = b = m;
            break;
          }
          if (fa * fm < 0) b = m;
          else [a, fa] = [m, fm];
        }
        out.push(0.5 * (a + b));
      }
      [za, ga] = [zb, gb];
    }
  }
  return keptBreaks(out, lo, hi);
}

/** Points at which a parameter is checked over a window: 64 evenly spaced (ends included) plus the table's nodes inside. */
export function samplePoints(window: { min: number; max: number }, p?: ZParam<BiasSource>): number[] {
  const n = 64;
  const pts: number[] = [];
  for (let i = 0; i < n; i++)
    pts.push(i === n - 1 ? window.max : window.min + ((window.max - window.min) * i) / (n - 1));
  if (p && isZTable(p.source)) {
    for (const [z] of p.source.table) if (z > window.min && z < window.max) pts.push(z);
  }
  return pts;
}

/** Most intervals an expression's check splits a window into before it relies on points alone. */
const MAX_INTERVALS = 4096;

/**
 * A redshift in the window where an expression's value fails `bad`, or undefined when its values
 * are shown good at every z of the window: the window is split in halves until interval
 * arithmetic bounds every value of a piece inside what `goodRange` accepts, the value at each
 * piece's middle checked on the way (so a narrow spike between sampled points is found, not
 * missed). A piece narrower than 2^-40 of the window's width or upper end (where rounding alone
 * can keep the bounds from closing), or any beyond MAX_INTERVALS, is checked at its middle only
 * (its ends are the window's or an earlier piece's middle, already checked).
 */
function unprovenPoint(
  p: ZParam<BiasSource>,
  bounds: Bounds,
  window: { min: number; max: number },
  bad: (v: number) => boolean,
  goodRange: (lo: number, hi: number) => boolean,
): number | undefined {
  return splitWindow(
    window,
    (a, b) => !goodRange(...bounds(a, b)),
    (m) => bad(p.at(m)),
  );
}

/**
 * The window split in halves, depth first with the left half first: a piece `open` says may hold
 * what is sought has its middle passed to `look` (which returns true to stop: that middle is
 * returned) and is split, unless narrower than 2^-40 of the window's width or upper end, or beyond
 * MAX_INTERVALS pieces. Undefined when no look stopped the search.
 */
function splitWindow(
  window: { min: number; max: number },
  open: (a: number, b: number) => boolean,
  look: (m: number) => boolean,
): number | undefined {
  const minWidth = Math.max(window.max - window.min, Math.abs(window.max)) * 2 ** -40;
  const stack: [number, number][] = [[window.min, window.max]];
  let budget = MAX_INTERVALS;
  while (stack.length > 0) {
    const [a, b] = stack.pop()!;
    if (!open(a, b)) continue;
    const m = a + (b - a) / 2;
    if (look(m)) return m;
    if (b - a <= minWidth || --budget <= 0) continue;
    stack.push([m, b], [a, m]);
  }
  return undefined;
}

/**
 * The least and greatest values of a parameter over a window, with where they are: at the table's
 * rows and 64 points, and for an expression at every z of the window: a piece of the window whose
 * interval bounds could hold a value more than `tol` beyond the extremes found so far is looked at
 * (its middle's value taken) and split in halves, so a narrow spike between sampled points is found.
 * What is returned is then within `tol` of the true extremes (a piece narrower than 2^-40 of the
 * window's width or upper end, or any beyond MAX_INTERVALS per extreme, is taken at its middle
 * only, as in `unprovenPoint`). The values must be finite over the window (`checkParam` first).
 */
export function paramExtremes(
  p: ZParam,
  window: { min: number; max: number },
  tol: number,
): { min: number; minZ: number; max: number; maxZ: number } {
  let min = Infinity;
  let minZ = window.min;
  let max = -Infinity;
  let maxZ = window.min;
  for (const z of samplePoints(window, p)) {
    const v = p.at(z);
    if (v < min) [min, minZ] = [v, z];
    if (v > max) [max, maxZ] = [v, z];
  }
  const bounds = expressionBounds.get(p);
  if (!bounds) return { min, minZ, max, maxZ };
  // the greatest of sign * value: sign 1 for the maximum, -1 for the minimum
  for (const sign of [1, -1]) {
    let best = sign > 0 ? max : -min;
    let bestZ = sign > 0 ? maxZ : minZ;
    const above = (a: number, b: number): number => {
      const [lo, hi] = bounds(a, b);
      // undefined bounds (NaN) are never below what was found: the piece is looked at
      return sign > 0 ? hi : -lo;
    };
    splitWindow(
      window,
      (a, b) => !(above(a, b) <= best + tol),
      (m) => {
        const v = sign * p.at(m);
        if (v > best) [best, bestZ] = [v, m];
        return false;
      },
    );
    if (sign > 0) [max, maxZ] = [best, bestZ];
    else [min, minZ] = [-best, bestZ];
  }
  return { min, minZ, max, maxZ };
}

/**
 * Check a parameter over a window: finite everywhere (bad_expression for an expression,
 * not_finite otherwise) and, when `positive`, > 0 (out_of_range). Every parameter is checked at the
 * table's rows and 64 points (a table, linear between its rows, is then checked everywhere); an
 * expression then at every z of the window (`unprovenPoint`).
 */
export function checkParam(
  p: ZParam<BiasSource>,
  window: { min: number; max: number },
  file: string,
  keyPath: string,
  opts: { positive?: boolean; what: string; range?: Range; unitLabel?: string },
): void {
  // a table's own rows first: a value outside the range is then named as the file writes it
  // ("1.1 at z = 2"), not where the line between two rows first crosses the bound
  const rows = isZTable(p.source)
    ? p.source.table.map(([z]) => z).filter((z) => z >= window.min && z <= window.max)
    : [];
  // where a value is refused: a constant has no z to name (the same everywhere), an expression or a
  // table is named at the z where it fails; the fix says what to change over the window
  const constant = p.constant === true;
  const over = `for every z from ${fmt(window.min)} to ${fmt(window.max)}`;
  const fix = (inRangeWords: string): string =>
    constant
      ? `give a value ${inRangeWords}`
      : typeof p.source === 'string'
        ? `change the expression so that it stays ${inRangeWords} ${over}`
        : typeof p.source === 'object' && 'over_growth' in p.source
          ? `change over_growth so that B / D(z) stays ${inRangeWords} ${over}`
          : `give values ${inRangeWords} ${over}`;
  const refuseAt = (z: number): void => {
    const v = p.at(z);
    const at = constant ? '' : ` at z = ${fmt(z)}`;
    if (!Number.isFinite(v)) {
      const bad = Number.isNaN(v) ? 'has no real value' : 'is infinite';
      if (typeof p.source === 'string') {
        throw inputError(
          'bad_expression',
          file,
          keyPath,
          `the expression "${p.source}" ${bad}${at}`,
          constant ? 'change it so that it is finite' : `change it so that it is finite ${over}`,
        );
      }
      throw inputError(
        'not_finite',
        file,
        keyPath,
        `${opts.what} ${bad}${at}`,
        constant ? 'give a finite value' : 'give values that stay finite over the redshift window',
      );
    }
    if (opts.positive && !(v > 0)) {
      throw inputError(
        'out_of_range',
        file,
        keyPath,
        `${opts.what} is ${fmt(v)}${at} but must be positive`,
        fix('above 0'),
      );
    }
    if (opts.range && !inRange(v, opts.range)) {
      throw inputError(
        'out_of_range',
        file,
        keyPath,
        `${opts.what} is ${fmt(v)}${opts.unitLabel ? ` ${opts.unitLabel}` : ''}${at}, outside its physical range (${describeRange(opts.range)})`,
        fix('in that range'),
      );
    }
  };
  for (const z of [...rows, ...samplePoints(window, p)]) refuseAt(z);
  // every sampled value passed: an expression is then shown in range between them, or refused
  // at a z where it is not
  const bounds = expressionBounds.get(p);
  if (bounds) {
    const bad = (v: number): boolean =>
      !Number.isFinite(v) ||
      (opts.positive === true && !(v > 0)) ||
      (opts.range !== undefined && !inRange(v, opts.range));
    const z = unprovenPoint(p, bounds, window, bad, (lo, hi) => !bad(lo) && !bad(hi));
    if (z !== undefined) refuseAt(z);
  }
  const analysis = featureAnalysis.get(p);
  if (analysis && typeof p.source === 'string') {
    const found = featureCuts(p, analysis, window);
    if (found.unresolved !== undefined) {
      throw inputError(
        'bad_expression',
        file,
        keyPath,
        `the expression "${p.source}" cannot be shown to change slowly enough near z = ${fmt(found.unresolved)} for the redshift integrals to follow it (interval arithmetic left it unresolved after ${MAX_INTERVALS} pieces)`,
        'give it as a table {table: [[z, value], ...]} with rows across that redshift',
      );
    }
    analysis.cuts.push(...found.cuts);
  }
}

/**
 * A cell whose derivative bound is below STEEP_RATIO V / L (V the expression's range over the
 * window, L the window's width) is smooth at the window's scale: it takes at least 1/64 of the
 * window to cross its range, and the redshift quadrature's choice of order by convergence (8 to 256
 * Gauss-Legendre nodes per piece) sees such a change. A narrow feature (a dip of width 1e-3 of the
 * window) is steeper than that.
 */
const STEEP_RATIO = 64;
/** A steep cell is split until its change (derivative bound times width) is at most this fraction of V. */
const CELL_CHANGE = 0.5;
/**
 * A cell whose value range times its width is below this fraction of S L (S the largest |value|
 * over the window) cannot move an integral over the window by more than that fraction, resolved or
 * not (where the derivative is unbounded, as sqrt(z) at 0, or a feature narrower than any cut).
 */
const NEGLIGIBLE = 1e-10;

/**
 * Where integrals over z should cut so that their rule follows an expression's narrow features
 * (docs/survey-file.md, "Parameters that vary with redshift"): the window is split in halves,
 * depth first, wherever interval arithmetic cannot show a piece smooth at the window's scale
 * (STEEP_RATIO), small enough for its own steepness (CELL_CHANGE) or negligible (NEGLIGIBLE); the
 * cuts are the middles of the pieces split, graded from the window's width down to the feature's.
 * None for an expression smooth over the whole window (every sample's). `unresolved` is a redshift
 * left unresolved after MAX_INTERVALS pieces.
 */
export function featureCuts(
  p: ZParam<BiasSource>,
  analysis: { bounds: Bounds; slope: Bounds },
  window: { min: number; max: number },
): { cuts: number[]; unresolved?: number } {
  const { bounds, slope } = analysis;
  const L = window.max - window.min;
  if (!(L > 0)) return { cuts: [] };
  let [vlo, vhi] = bounds(window.min, window.max);
  if (!(Number.isFinite(vlo) && Number.isFinite(vhi))) {
    // the bounds over the whole window are too loose: the range the samples show
    const values = samplePoints(window).map((z) => p.at(z));
    [vlo, vhi] = [Math.min(...values), Math.max(...values)];
  }
  const V = vhi - vlo;
  const S = Math.max(Math.abs(vlo), Math.abs(vhi));
  if (!(V > 0)) return { cuts: [] };
  const steep = (STEEP_RATIO * V) / L;
  const minWidth = Math.max(L, Math.abs(window.max)) * 2 ** -40;
  const resolved = (a: number, b: number): boolean => {
    const h = b - a;
    const [d0, d1] = slope(a, b);
    const m = Math.max(Math.abs(d0), Math.abs(d1));
    if (m <= steep || m * h <= CELL_CHANGE * V) return true;
    const [w0, w1] = bounds(a, b);
    return (w1 - w0) * h <= NEGLIGIBLE * S * L;
  };
  const cuts: number[] = [];
  const stack: [number, number][] = [[window.min, window.max]];
  let budget = MAX_INTERVALS;
  while (stack.length > 0) {
    const [a, b] = stack.pop()!;
    if (b - a <= minWidth || resolved(a, b)) continue;
    const m = a + (b - a) / 2;
    if (--budget <= 0) return { cuts, unresolved: m };
    cuts.push(m);
    stack.push([m, b], [a, m]);
  }
  return { cuts: keptBreaks(cuts, window.min, window.max) };
}

/** Short number for messages. */
export function fmt(v: number): string {
  return precise(v, 6);
}
